import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { errorMessage, isApiError } from './api-client';

const EMPTY: ReadonlySet<string> = new Set();

/**
 * Field and form messages for a form driven by one mutation.
 *
 * - `field(name)` gives the message for a field until the user edits that field again.
 * - `formMessage` is the sentence to show above the form when the error is not (only) about the
 *   form's own fields: a conflict, a rate limit, a network failure, a field the form does not have.
 * - `formRef`, attached to the <form>, moves the focus to the first field marked invalid after a
 *   failed submit, so keyboard and screen-reader users land on what needs fixing.
 */
export function useFormErrors(error: unknown, fieldNames: readonly string[]) {
  // fields edited since *this* error arrived; a new error starts with none edited
  const [edited, setEdited] = useState<{ error: unknown; names: ReadonlySet<string> }>({ error, names: EMPTY });
  const names = edited.error === error ? edited.names : EMPTY;
  const formRef = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (!error) return;
    formRef.current?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }, [error]);

  const fields = isApiError(error) ? error.fields : {};
  const field = useCallback((name: string) => (names.has(name) ? undefined : fields[name]), [names, fields]);
  const onEdit = useCallback(
    (name: string) =>
      setEdited((s) => {
        const current = s.error === error ? s.names : EMPTY;
        if (current.has(name)) return s.error === error ? s : { error, names: current };
        const next = new Set(current);
        next.add(name);
        return { error, names: next };
      }),
    [error],
  );

  const formMessage = useMemo(() => {
    if (!error) return undefined;
    if (!isApiError(error)) return errorMessage(error);
    const keys = Object.keys(error.fields);
    const unmatched = keys.filter((k) => !fieldNames.includes(k));
    if (keys.length === 0) return error.message;
    if (unmatched.length > 0) return unmatched.map((k) => (k ? `${k}: ${error.fields[k]}` : error.fields[k])).join(' ');
    return undefined;
  }, [error, fieldNames]);

  return { field, onEdit, formMessage, formRef };
}

/** Reads a form's named inputs as strings. */
export function formValues(form: HTMLFormElement): Record<string, string> {
  const out: Record<string, string> = {};
  new FormData(form).forEach((v, k) => {
    if (typeof v === 'string') out[k] = v;
  });
  return out;
}
