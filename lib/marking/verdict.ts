/** Verdicts are never shown by colour alone: each has a word and a symbol too. */
export type VerdictKey = 'within' | 'partial' | 'outside' | 'not-checked';

export const VERDICT_INFO: Record<VerdictKey, { word: string; symbol: string; className: string; rgb: [number, number, number] }> = {
  within: {
    word: 'within tolerance',
    symbol: '✓',
    className: 'text-verdict-within bg-verdict-within-bg',
    rgb: [0x1d / 255, 0x6a / 255, 0x3b / 255],
  },
  partial: {
    word: 'partial credit',
    symbol: '◐',
    className: 'text-verdict-partial bg-verdict-partial-bg',
    rgb: [0x7d / 255, 0x4e / 255, 0],
  },
  outside: {
    word: 'outside tolerance',
    symbol: '✗',
    className: 'text-verdict-outside bg-verdict-outside-bg',
    rgb: [0xa3 / 255, 0x26 / 255, 0x1c / 255],
  },
  'not-checked': {
    word: 'not checked',
    symbol: '–',
    className: 'text-verdict-unchecked bg-verdict-unchecked-bg',
    rgb: [0x4a / 255, 0x53 / 255, 0x61 / 255],
  },
};

export function verdictInfo(v: string | null | undefined) {
  return VERDICT_INFO[(v && v in VERDICT_INFO ? v : 'not-checked') as VerdictKey];
}

/** The worse of two verdicts (for one line per quantity). */
export function worstVerdict(a: string | undefined, b: string | undefined): VerdictKey {
  const order: VerdictKey[] = ['outside', 'partial', 'within', 'not-checked'];
  for (const v of order) if (a === v || b === v) return v;
  return 'not-checked';
}
