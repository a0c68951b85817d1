/** Everything the model editor adds to CodeMirror, usable with or without React. */
import { autocompletion, closeBrackets, closeBracketsKeymap, completionKeymap } from '@codemirror/autocomplete';
import { defaultKeymap, history, historyKeymap, indentWithTab } from '@codemirror/commands';
import { bracketMatching } from '@codemirror/language';
import { lintKeymap } from '@codemirror/lint';
import { Compartment, EditorState, Prec, type Extension } from '@codemirror/state';
import {
  drawSelection,
  EditorView,
  highlightActiveLine,
  highlightActiveLineGutter,
  keymap,
  lineNumbers,
} from '@codemirror/view';
import type { CheckResult, DataSchema } from '@shared/lang';
import { modelCompletionSource } from './completion';
import { modelHover } from './hover';
import { modelHighlighting, modelLanguage } from './language';
import { modelLinter } from './lint';
import { schemaFacet } from './schema';
import { modelTheme } from './theme';

export interface ModelExtensionOptions {
  /** Returns the latest run handler (read at key-press time). */
  getOnRun?: () => ((source: string) => void) | undefined;
  /** Receives every check result from the live diagnostics. */
  onCheck?: (result: CheckResult) => void;
  /** Pause in typing before a check, ms. */
  lintDelay?: number;
  /** Accessible label of the text area. */
  label?: string;
}

/** Compartments the component reconfigures when props change. */
export interface ModelCompartments {
  schema: Compartment;
  readOnly: Compartment;
}

export function schemaExtension(schema: DataSchema | undefined): Extension {
  return schemaFacet.of(schema ?? {});
}

export function readOnlyExtension(readOnly: boolean): Extension {
  return [EditorState.readOnly.of(readOnly), EditorView.editable.of(!readOnly)];
}

/** Mod-Enter runs the cell (highest precedence: the default keymap binds it to a blank line). */
function runKeymap(getOnRun: ModelExtensionOptions['getOnRun']): Extension {
  return Prec.highest(
    keymap.of([
      {
        key: 'Mod-Enter',
        run: (view) => {
          const onRun = getOnRun?.();
          if (!onRun) return false;
          onRun(view.state.doc.toString());
          return true;
        },
      },
    ]),
  );
}

export function modelExtensions(
  compartments: ModelCompartments,
  initial: { schema?: DataSchema; readOnly?: boolean },
  options: ModelExtensionOptions = {},
): Extension[] {
  return [
    compartments.schema.of(schemaExtension(initial.schema)),
    compartments.readOnly.of(readOnlyExtension(initial.readOnly ?? false)),
    runKeymap(options.getOnRun),
    lineNumbers(),
    highlightActiveLineGutter(),
    highlightActiveLine(),
    drawSelection(),
    history(),
    bracketMatching(),
    closeBrackets(),
    modelLanguage,
    modelHighlighting,
    autocompletion({ override: [modelCompletionSource], icons: false, activateOnTyping: true }),
    modelLinter(options.onCheck, options.lintDelay),
    modelHover,
    modelTheme,
    EditorState.tabSize.of(2),
    EditorView.contentAttributes.of({ 'aria-label': options.label ?? 'Model', spellcheck: 'false', autocorrect: 'off', autocapitalize: 'off' }),
    keymap.of([...closeBracketsKeymap, ...completionKeymap, ...lintKeymap, ...historyKeymap, ...defaultKeymap, indentWithTab]),
  ];
}
