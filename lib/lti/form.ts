/** Reading the form posts of the protocol (application/x-www-form-urlencoded), bounded in size. */
import { LaunchRefused } from './page';

export const MAX_FORM_BYTES = 64 * 1024;

export async function readForm(request: Request): Promise<URLSearchParams> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.toLowerCase().startsWith('application/x-www-form-urlencoded')) {
    throw new LaunchRefused(
      415,
      'not-a-form',
      'Oscillab could not read this request',
      'The learning platform must send this as a form post (application/x-www-form-urlencoded).',
    );
  }
  const tooLarge = () =>
    new LaunchRefused(
      413,
      'form-too-large',
      'The sign-in message is too large',
      'The form the learning platform sent is larger than Oscillab accepts.',
    );
  if (Number(request.headers.get('content-length') ?? 0) > MAX_FORM_BYTES) throw tooLarge();
  if (!request.body) return new URLSearchParams();
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    let part: ReadableStreamReadResult<Uint8Array>;
    try {
      part = await reader.read();
    } catch {
      throw new LaunchRefused(
        400,
        'interrupted',
        'The request was interrupted',
        'The form did not arrive whole; go back to the learning platform and try again.',
      );
    }
    if (part.done) break;
    size += part.value.byteLength;
    if (size > MAX_FORM_BYTES) {
      await reader.cancel();
      throw tooLarge();
    }
    chunks.push(part.value);
  }
  return new URLSearchParams(Buffer.concat(chunks).toString('utf8'));
}
