import { readdirSync, readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { compilePlant, formatDiagnostic, loadPlant } from '../../src/model/index.js';

const plantsDir = new URL('../fixtures/plants/', import.meta.url);
const GOOD = readdirSync(plantsDir).map((f) => readFileSync(new URL(f, plantsDir), 'utf8'));

/** The loader's contract on any text: no throw, no internal error, spans inside the text, a plant or an error. */
function checkContract(text: string): void {
  const r = loadPlant(text, 'fuzz.yaml');
  for (const d of r.diagnostics) {
    expect(d.code).not.toBe('INTERNAL_ERROR');
    expect(d.span[0]).toBeGreaterThanOrEqual(0);
    expect(d.span[1]).toBeGreaterThanOrEqual(d.span[0]);
    expect(d.span[1]).toBeLessThanOrEqual(text.length);
    formatDiagnostic(d, text, 'fuzz.yaml', { caret: true });
  }
  const hasError = r.diagnostics.some((d) => d.severity === 'error');
  expect(r.plant === undefined).toBe(hasError);
  // A plant that loads must also compile.
  if (r.plant) compilePlant(r.plant);
}

describe('loadPlant on mutated and random input', () => {
  it('keeps its contract when a good file has a character replaced, inserted or deleted', () => {
    const edit = fc.record({
      file: fc.integer({ min: 0, max: GOOD.length - 1 }),
      pos: fc.nat(),
      op: fc.constantFrom('replace', 'insert', 'delete'),
      ch: fc.constantFrom(' ', '\n', ':', '-', '[', ']', '{', '}', '#', '"', "'", '(', ')', '&', '*', '!', '0', '9', 'x', '\t', '.', ','),
    });
    fc.assert(
      fc.property(fc.array(edit, { minLength: 1, maxLength: 3 }), (edits) => {
        let text = GOOD[edits[0].file];
        for (const e of edits) {
          const i = e.pos % (text.length + 1);
          if (e.op === 'insert') text = text.slice(0, i) + e.ch + text.slice(i);
          else if (e.op === 'delete') text = text.slice(0, i) + text.slice(i + 1);
          else text = text.slice(0, i) + e.ch + text.slice(i + 1);
        }
        checkContract(text);
      }),
      { numRuns: 100 },
    );
  });

  it('keeps its contract on random text', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 200 }), (text) => checkContract(text)),
      { numRuns: 100 },
    );
  });

  it('keeps its contract when a good file has one line removed', () => {
    // Two fixtures (ode and linear with every event kind) keep the suite fast.
    for (const text of GOOD.filter((t) => /type: (ode|first_order)/.test(t))) {
      const lines = text.split('\n');
      for (let i = 0; i < lines.length; i++) checkContract([...lines.slice(0, i), ...lines.slice(i + 1)].join('\n'));
    }
  });
});
