/** Read what reached the local mail catcher through its REST API. */
const api = () => process.env.MAILDEV_API || 'http://127.0.0.1:1180';

export type CaughtMail = {
  id: string;
  subject: string;
  text: string;
  /** Header names lower-cased, as maildev reports them. */
  headers: Record<string, string>;
  to: { address: string }[];
  attachments?: { fileName: string; contentType: string; generatedFileName: string }[];
};

export async function caughtMail(): Promise<CaughtMail[]> {
  const res = await fetch(`${api()}/api/email`);
  if (!res.ok) throw new Error(`maildev answered ${res.status}`);
  return res.json();
}

export async function mailTo(address: string): Promise<CaughtMail[]> {
  return (await caughtMail()).filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()));
}

export async function waitForMail(address: string, count = 1, timeoutMs = 10000): Promise<CaughtMail[]> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const found = await mailTo(address);
    if (found.length >= count || Date.now() > end) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
}

export async function attachment(mail: CaughtMail, generatedFileName: string): Promise<Buffer> {
  const res = await fetch(`${api()}/api/email/${mail.id}/attachment/${generatedFileName}`);
  return Buffer.from(await res.arrayBuffer());
}
