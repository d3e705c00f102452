/**
 * The checks of one typed quantity that can be made as the student types, in the browser, before
 * anything is sent: is the value a number, is the unit one of this quantity's, is a required
 * uncertainty there. The same unit table and number reader as the grading engine (lib/grading),
 * so what passes here is what the engine accepts. Pure; no server-only imports.
 */
import { toSI, type Dimension } from '@/lib/grading/units';
import { parseTypedNumber } from '@/lib/grading/uncertainty';

export type LiveIssue = { field: 'value' | 'unit' | 'uncertainty'; message: string };

export function liveCheck(
  input: { value: string; unit: string; uncertainty: string },
  dimension: Dimension,
  uncertaintyRequired: boolean,
): LiveIssue[] {
  const value = input.value.trim();
  const unit = input.unit.trim();
  const uncertainty = input.uncertainty.trim();
  // Nothing typed yet: nothing to say (a missing quantity is listed by the full check).
  if (!value && !uncertainty) return [];
  const issues: LiveIssue[] = [];
  const typed = value ? parseTypedNumber(value) : null;
  if (!value) issues.push({ field: 'value', message: 'An uncertainty without a value: enter the value too.' });
  else if (typed && !typed.ok) issues.push({ field: 'value', message: typed.message });
  if (dimension !== 'ratio' || unit) {
    const si = toSI(typed && typed.ok ? typed.value : 1, unit, dimension);
    if (!si.ok && !/wavelength must be positive/.test(si.message)) issues.push({ field: 'unit', message: si.message });
  }
  const inValue = typed && typed.ok && typed.uncertainty !== undefined;
  if (uncertainty) {
    const u = Number(uncertainty.replace(/^±\s*/, '').replace(',', '.'));
    if (!Number.isFinite(u) || u < 0)
      issues.push({
        field: 'uncertainty',
        message: `"${uncertainty}" is not an uncertainty: type a positive number in the same unit as the value, e.g. 0.5.`,
      });
  } else if (uncertaintyRequired && value && !inValue) {
    issues.push({ field: 'uncertainty', message: 'An uncertainty is required for this quantity (in the same unit as the value).' });
  }
  return issues;
}
