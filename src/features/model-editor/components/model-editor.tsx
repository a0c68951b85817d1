import { Annotation, Compartment, EditorState } from '@codemirror/state';
import { EditorView } from '@codemirror/view';
import '@fontsource/jetbrains-mono/400.css';
import '@fontsource/jetbrains-mono/600.css';
import '@fontsource/jetbrains-mono/400-italic.css';
import type { CheckResult, DataSchema } from '@shared/lang';
import { useEffect, useLayoutEffect, useRef } from 'react';
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

/**
 * Editors mounted in the same commit (a notebook opening with a dozen model cells) are put into the
 * page together at the end of it. A view reads the document's selection while it is built, which
 * makes the browser lay out the page first when the page has changed; built outside the page and
 * placed one after another, each editor would pay for a layout of everything the previous one
 * added. Built outside and placed together, the layout happens once.
 */
let pending: (() => void)[] = [];

function placeSoon(place: () => void): void {
  pending.push(place);
  if (pending.length === 1) queueMicrotask(placePending);
}

function placePending(): void {
  const jobs = pending;
  pending = [];
  for (const place of jobs) place();
}

/** The model-cell editor: highlighting, completion, live diagnostics and Mod-Enter to run. */
export function ModelEditor(props: ModelEditorProps) {
  const host = useRef<HTMLDivElement>(null);
  const viewRef = useRef<EditorView | null>(null);
  const latest = useRef(props);
  latest.current = props;
  const compartments = useRef<ModelCompartments | null>(null);
  if (compartments.current === null) compartments.current = { schema: new Compartment(), readOnly: new Compartment() };

  // Built before the browser paints the commit that adds the editor, so the text shows in the same
  // frame as the rest of the cell.
  useLayoutEffect(() => {
    const c = compartments.current!;
    const p = latest.current;
    const view = new EditorView({
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
    // Built outside the page; placed with the other editors of this commit (see placeSoon).
    let destroyed = false;
    placeSoon(() => {
      if (!destroyed) host.current?.appendChild(view.dom);
    });
    return () => {
      destroyed = true;
      latest.current.onView?.(null);
      view.destroy();
      viewRef.current = null;
    };
  }, []);

  // The view is built with the schema and read-only flag of its first render: reconfigure only
  // when they change afterwards.
  const applied = useRef({ schema: props.schema, readOnly: props.readOnly ?? false });

  useEffect(() => {
    if (applied.current.schema === props.schema) return;
    applied.current.schema = props.schema;
    viewRef.current?.dispatch({ effects: compartments.current!.schema.reconfigure(schemaExtension(props.schema)) });
  }, [props.schema]);

  useEffect(() => {
    const readOnly = props.readOnly ?? false;
    if (applied.current.readOnly === readOnly) return;
    applied.current.readOnly = readOnly;
    viewRef.current?.dispatch({ effects: compartments.current!.readOnly.reconfigure(readOnlyExtension(readOnly)) });
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
