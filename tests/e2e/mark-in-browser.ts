import type { Page } from '@playwright/test';

/**
 * Mark a submission as the TA signed in on `page` does, through the API from the page: accept the
 * engine's proposed marks, then award each item still open 1 mark (at most its maximum). Answers
 * the submission's status after saving ('marked' when every item has a mark).
 */
export function markInBrowser(page: Page, id: number): Promise<string> {
  return page.evaluate(async (id) => {
    const send = (url: string, method: string, body: unknown) =>
      fetch(url, { method, headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) });
    let view = await (await fetch(`/api/marking/${id}`)).json();
    await send(`/api/marking/${id}/accept`, 'POST', { version: view.submission.version });
    view = await (await fetch(`/api/marking/${id}`)).json();
    const open = view.marks
      .filter((m: { awarded: number | null }) => m.awarded === null)
      .map((m: { itemKey: string; maxMarks: number }) => ({ itemKey: m.itemKey, awarded: Math.min(1, m.maxMarks) }));
    const saved = await (await send(`/api/marking/${id}`, 'PUT', { version: view.submission.version, items: open })).json();
    return saved.status as string;
  }, id);
}
