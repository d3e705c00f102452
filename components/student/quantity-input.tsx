'use client';
import { useEffect } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import type { Dimension } from '@/lib/grading/units';
import type { Draft } from '@/lib/schemas/submission';
import { liveCheck } from '@/lib/submissions/live-check';

/**
 * One reported quantity: value, unit and uncertainty, checked as the student types (number, unit
 * of the right kind, required uncertainty). The messages sit under the box they are about and are
 * tied to it with aria-describedby; nothing is sent until the student asks.
 */
export function QuantityInput({
  form,
  sp,
  name,
  label,
  options,
  required,
  dimension,
  defaultUnit,
  path,
}: {
  form: UseFormReturn<Draft>;
  sp: string;
  name: string;
  label: string;
  options: string[];
  required: boolean;
  dimension: Dimension;
  defaultUnit?: string;
  path?: 'overtone';
}) {
  const base = (path === 'overtone' ? `species.${sp}.overtone` : `species.${sp}.values.${name}`) as `species.${string}.values.${string}`;
  const id = `q-${sp}-${name}`;
  const listId = `${id}-units`;
  useEffect(() => {
    if (defaultUnit && !form.getValues(`${base}.unit`)) form.setValue(`${base}.unit`, defaultUnit);
  }, [base, defaultUnit, form]);
  const current = form.watch(base) ?? { value: '', unit: '', uncertainty: '' };
  const issues = liveCheck(
    { value: current.value ?? '', unit: current.unit ?? '', uncertainty: current.uncertainty ?? '' },
    dimension,
    required,
  );
  const issue = (field: 'value' | 'unit' | 'uncertainty') => issues.find((i) => i.field === field);
  const described = (field: 'value' | 'unit' | 'uncertainty') => (issue(field) ? `${id}-${field}-check` : undefined);
  return (
    <div className={`rounded border p-3 ${issues.length ? 'border-verdict-partial' : 'border-rule'}`} data-quantity={`${sp}:${name}`}>
      <p className="label" id={`${id}-label`}>
        {label}
      </p>
      <div className="grid grid-cols-2 gap-2 sm:grid-cols-3">
        <div className="col-span-2 sm:col-span-1">
          <label className="hint" htmlFor={`${id}-value`}>
            Value
          </label>
          <input
            id={`${id}-value`}
            className="field num"
            inputMode="decimal"
            autoComplete="off"
            aria-invalid={issue('value') ? true : undefined}
            aria-describedby={described('value')}
            {...form.register(`${base}.value`)}
          />
        </div>
        <div>
          <label className="hint" htmlFor={`${id}-unit`}>
            Unit
          </label>
          <input
            id={`${id}-unit`}
            className="field"
            list={listId}
            autoComplete="off"
            aria-invalid={issue('unit') ? true : undefined}
            aria-describedby={described('unit')}
            {...form.register(`${base}.unit`)}
          />
          <datalist id={listId}>
            {options.map((o) => (
              <option key={o} value={o} />
            ))}
          </datalist>
        </div>
        <div>
          <label className="hint" htmlFor={`${id}-unc`}>
            Uncertainty (±){required ? ' — required' : ''}
          </label>
          <input
            id={`${id}-unc`}
            className="field num"
            inputMode="decimal"
            autoComplete="off"
            aria-invalid={issue('uncertainty') ? true : undefined}
            aria-describedby={described('uncertainty')}
            {...form.register(`${base}.uncertainty`)}
          />
        </div>
      </div>
      {issues.length > 0 && (
        <ul className="mt-2 space-y-1 text-sm text-verdict-partial" data-testid="live-check">
          {issues.map((i) => (
            <li key={i.field} id={`${id}-${i.field}-check`}>
              <span aria-hidden="true">◐ </span>
              <span className="sr-only">Check: </span>
              {i.message}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
