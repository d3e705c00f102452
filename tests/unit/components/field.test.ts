import { createElement, type ReactElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { Field } from '@/components/ui/field';

const input = (props: Record<string, unknown>) => createElement('input', props) as unknown as ReactElement<Record<string, unknown>>; // Field's own prop type
const html = (props: Parameters<typeof Field>[0]) => renderToStaticMarkup(createElement(Field, props));

describe('Field', () => {
  it('ties the label, hint and error to the control', () => {
    const out = html({
      id: 'q-marks',
      label: 'Marks',
      hint: 'Whole or half marks',
      error: 'Must be positive',
      children: input({ className: 'field' }),
    });
    expect(out).toContain('<label for="q-marks" class="label">Marks</label>');
    expect(out).toContain('id="q-marks"');
    expect(out).toContain('aria-describedby="q-marks-hint q-marks-error"');
    expect(out).toContain('aria-invalid="true"');
    expect(out).toContain('<p id="q-marks-hint" class="hint">Whole or half marks</p>');
    expect(out).toContain('<p id="q-marks-error" class="error-text">Must be positive</p>');
  });

  it('keeps a description the control already names, and claims no error without one', () => {
    const out = html({ id: 'roster-file', label: 'Roster file', children: input({ type: 'file', 'aria-describedby': 'roster-hint' }) });
    expect(out).toContain('aria-describedby="roster-hint"');
    expect(out).not.toContain('aria-invalid');
    expect(out).not.toContain('error-text');
  });
});
