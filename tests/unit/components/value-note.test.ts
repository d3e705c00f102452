import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { ValueNote, splitNote } from '@/components/ui/value-note';

const html = (props: Parameters<typeof ValueNote>[0]) => renderToStaticMarkup(createElement(ValueNote, props));

describe('ValueNote', () => {
  it('keeps a value without a note in one unbroken piece', () => {
    expect(html({ value: '0.97959 u' })).toBe('<span class="nowrap">0.97959 u</span>');
  });

  it('lets an uncertainty follow on the same line, as one element with two unbroken pieces', () => {
    expect(html(splitNote('2886.0 ± 0.3 cm⁻¹', ' ± '))).toBe(
      '<span><span class="nowrap">2886.0</span> <span class="nowrap">± 0.3 cm⁻¹</span></span>',
    );
  });

  it('puts a note on a line of its own when asked', () => {
    expect(html({ ...splitNote('+0.0348 cm⁻¹ (+0.0012 %)', ' ('), below: true })).toBe(
      '<span><span class="nowrap">+0.0348 cm⁻¹</span><span class="nowrap block text-ink-soft">(+0.0012 %)</span></span>',
    );
  });
});

describe('splitNote', () => {
  it('splits at the first marker and keeps its visible part with the note', () => {
    expect(splitNote('10.44 cm⁻¹ (± 0.002 cm⁻¹) (x)', ' (')).toEqual({ value: '10.44 cm⁻¹', note: '(± 0.002 cm⁻¹) (x)' });
    expect(splitNote('10.44 cm⁻¹', ' (')).toEqual({ value: '10.44 cm⁻¹', note: null });
  });
});
