/**
 * The constraint lines of a model's text that a comparison can test: `constrain` lines that are
 * inequalities (an equality's region has no volume, so its masses are zero and it cannot be tested).
 * Read from the text alone, so the picker shows them as they are written.
 */
export interface ConstraintLine {
  line: number;
  /** The line as written, without its comment. */
  text: string;
}

export function testableConstraintLines(source: string): ConstraintLine[] {
  const out: ConstraintLine[] = [];
  source.split(/\r?\n/).forEach((raw, i) => {
    const code = raw.replace(/#.*$/, '').trim();
    if (!/^constrain\b/.test(code)) return;
    if (/==/.test(code)) return;
    out.push({ line: i + 1, text: code });
  });
  return out;
}
