/**
 * Live diagnostics: the front end's checker (shared/lang checkProgram) runs on the document after a
 * pause in typing; each message becomes a lint marker on its exact columns. A suggestion that is a
 * plain name (e.g. `sigma` for `sigam`) or a whole call (the new spelling of a retired function) is
 * offered as a one-click fix.
 */
import { linter, type Diagnostic } from '@codemirror/lint';
import type { EditorView } from '@codemirror/view';
import { checkProgram, type CheckResult, type LangMessage } from '@shared/lang';
import { schemaFacet } from './schema';
import { messageElement } from '@/components/message-text';

const NAME = /^[A-Za-z_][A-Za-z0-9_]*(?:\.[A-Za-z_][A-Za-z0-9_]*)?$/;

/**
 * The replacement name in a checker suggestion, if it is just a name: "did you mean `sigma`?" →
 * "sigma", "orchard.block" → "orchard.block"; other advice ("add the line: table x") → undefined.
 */
export function suggestedName(suggestion: string | undefined): string | undefined {
  if (!suggestion) return undefined;
  const quoted = /^did you mean `([^`]+)`\?$/.exec(suggestion.trim());
  const name = quoted ? quoted[1] : suggestion.trim();
  return NAME.test(name) ? name : undefined;
}

const CALL = /^[A-Za-z_][A-Za-z0-9_]*\(.*\)$/;

/**
 * The replacement text of a checker suggestion: a plain name as {@link suggestedName}, or a whole
 * call such as "did you mean `ld_binomial(k, n, logistic(eta))`?" (offered where the message marks
 * the call it replaces).
 */
export function suggestedFix(suggestion: string | undefined): string | undefined {
  const name = suggestedName(suggestion);
  if (name) return name;
  const quoted = suggestion ? /^did you mean `([^`]+)`\?$/.exec(suggestion.trim()) : null;
  return quoted && CALL.test(quoted[1]) ? quoted[1] : undefined;
}

/** Turns checker messages into CodeMirror diagnostics (document positions, clamped to the line). */
export function messagesToDiagnostics(view: EditorView, messages: readonly LangMessage[]): Diagnostic[] {
  const doc = view.state.doc;
  const out: Diagnostic[] = [];
  for (const m of messages) {
    if (m.line < 1 || m.line > doc.lines) continue;
    const line = doc.line(m.line);
    let from = Math.min(line.to, line.from + Math.max(0, m.column - 1));
    let to = Math.min(line.to, line.from + Math.max(m.column, m.endColumn - 1));
    if (to <= from) {
      // A message at the end of a line (e.g. "`)` is missing") marks the last character.
      from = Math.max(line.from, Math.min(from, line.to - 1));
      to = Math.max(from, line.to);
    }
    const message = m.suggestion ? `${m.message}; ${m.suggestion}` : m.message;
    const d: Diagnostic = {
      from,
      to,
      severity: m.severity,
      message,
      // Backtick spans shown as inline code in the tooltip.
      renderMessage: (v) => messageElement(message, v.dom.ownerDocument),
      source: 'model check',
    };
    const fix = suggestedFix(m.suggestion);
    if (fix && to > from) {
      d.actions = [
        {
          name: `Use ${fix}`,
          apply: (v, a, b) => v.dispatch({ changes: { from: a, to: b, insert: fix } }),
        },
      ];
    }
    out.push(d);
  }
  return out;
}

/**
 * The lint extension. `onCheck` receives every check result (for a summary beside the editor).
 * `delay` is the pause in typing before a check, in milliseconds.
 */
export function modelLinter(onCheck?: (result: CheckResult) => void, delay = 350) {
  return linter(
    (view) => {
      const result = checkProgram(view.state.doc.toString(), view.state.facet(schemaFacet));
      onCheck?.(result);
      return messagesToDiagnostics(view, result.messages);
    },
    {
      delay,
      needsRefresh: (update) => update.startState.facet(schemaFacet) !== update.state.facet(schemaFacet),
    },
  );
}
