import { idParam, json, readJson, route } from '@/lib/http';
import { spectrumSettingsSchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { saveSpectrumSettings, spectrumSettings } from '@/lib/instructor/spectrum-settings';

type Ctx = { params: Promise<{ practicalId: string }> };

/** Which spectra the practical takes, and whether the third comparison ("from your spectrum") is shown. */
export const GET = route<Ctx>(async (request, { params }) => {
  const { practical } = await authorizePractical(request, idParam((await params).practicalId));
  return json(await spectrumSettings(practical));
});

export const PUT = route<Ctx>(async (request, { params }) => {
  const { actor, practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, spectrumSettingsSchema);
  return json(await saveSpectrumSettings(practical, data, actor.id));
});
