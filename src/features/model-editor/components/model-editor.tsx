import { Annotation, Compartment, EditorState } from '@codemirror/state';
import { EditorView } from '@codemirror/view';
import '@fontsource/jetbrains-mono/400.css';
import '@fontsource/jetbrains-mono/600.css';
import '@fontsource/jetbrains-mono/400-italic.css';
import type { CheckResult, DataSchema } from '@shared/lang';
import { useEffect, useRef } from 'react';
import { modelExtensions, readOnlyExtension, schemaExtension, type ModelCompartments } from '../extensions';

/** Marks changes that come from the `value` prop, so they are not echoed back through onChange. */
const fromProps = Annotation.define<boolean>();

export interface ModelEditorProps {
  /** The model source. The editor follows this prop when it changes from outside. */
  value: string;
  /** Called with the whole source after every edit by the user. */
  onChange?: (value: string) => void;
  /** Data tables available to the model: names, columns, types, row counts (for completion and checks). */
  schema?: DataSchema;
  readOnly?: boolean;
  /** Called with the source on Mod-Enter (Ctrl-Enter / Cmd-Enter). */
  onRun?: (value: string) => void;
  /** Receives each live check result (unknowns, constraint counts, messages). */
  onCheck?: (result: CheckResult) => void;
  /** Pause in typing before a check, ms (default 350). */
  lintDelay?: number;
  /** Accessible label of the text area (default "Model"). */
  label?: string;
  className?: string;
  /** Receives the CodeMirror view once it exists (and null when it goes away). */
  onView?: (view: EditorView | null) => void;
}

/** The model-cell editor: highlighting, completion, live diagnostics and Mod-Enter to run. */
export function ModelEditor(props: ModelEditorProps) {
  const host = useRef<HTMLDivElement>(null);
  const viewRef = useRef<EditorView | null>(null);
  const latest = useRef(props);
  latest.current = props;
  const compartments = useRef<ModelCompartments | null>(null);
  if (compartments.current === null) compartments.current = { schema: new Compartment(), readOnly: new Compartment() };

  useEffect(() => {
    const c = compartments.current!;
    const p = latest.current;
    const view = new EditorView({
      parent: host.current!,
      state: EditorState.create({
        doc: p.value,
        extensions: [
          ...modelExtensions(
            c,
            { schema: p.schema, readOnly: p.readOnly },
            {
              getOnRun: () => latest.current.onRun,
              onCheck: (r) => latest.current.onCheck?.(r),
              lintDelay: p.lintDelay,
              label: p.label,
            },
          ),
          EditorView.updateListener.of((u) => {
            if (!u.docChanged) return;
            if (u.transactions.some((t) => t.annotation(fromProps))) return;
            latest.current.onChange?.(u.state.doc.toString());
          }),
        ],
      }),
    });
    viewRef.current = view;
    p.onView?.(view);
    return () => {
      latest.current.onView?.(null);
      view.destroy();
      viewRef.current = null;
    };
  }, []);

  useEffect(() => {
    viewRef.current?.dispatch({ effects: compartments.current!.schema.reconfigure(schemaExtension(props.schema)) });
  }, [props.schema]);

  useEffect(() => {
    viewRef.current?.dispatch({ effects: compartments.current!.readOnly.reconfigure(readOnlyExtension(props.readOnly ?? false)) });
  }, [props.readOnly]);

  useEffect(() => {
    const view = viewRef.current;
    if (!view) return;
    const current = view.state.doc.toString();
    if (current === props.value) return;
    view.dispatch({ changes: { from: 0, to: current.length, insert: props.value }, annotations: fromProps.of(true) });
  }, [props.value]);

  return <div ref={host} className={props.className} data-testid="model-editor" />;
}
