/** Total = sum of awarded marks, less the late penalty (a percent of that sum). */
export function totalAfterPenalty(awarded: (number | null)[], latePenaltyPercent: number): number {
  const sum = awarded.reduce<number>((s, a) => s + (a ?? 0), 0);
  const p = Math.min(100, Math.max(0, latePenaltyPercent || 0));
  return Math.round(sum * (1 - p / 100) * 100) / 100;
}

export function rawSum(awarded: (number | null)[]): number {
  return Math.round(awarded.reduce<number>((s, a) => s + (a ?? 0), 0) * 100) / 100;
}
