import { useCallback, useEffect, useMemo, useState } from 'react';
import { errorMessage, isApiError } from './api-client';

/**
 * Field and form messages for a form driven by one mutation.
 *
 * - `field(name)` gives the message for a field until the user edits that field again.
 * - `formMessage` is the sentence to show above the form when the error is not (only) about the
 *   form's own fields: a conflict, a rate limit, a network failure, a field the form does not have.
 */
export function useFormErrors(error: unknown, fieldNames: readonly string[]) {
  const [edited, setEdited] = useState<ReadonlySet<string>>(new Set());
  useEffect(() => setEdited(new Set()), [error]);

  const fields = isApiError(error) ? error.fields : {};
  const field = useCallback((name: string) => (edited.has(name) ? undefined : fields[name]), [edited, fields]);
  const onEdit = useCallback(
    (name: string) =>
      setEdited((s) => {
        if (s.has(name)) return s;
        const next = new Set(s);
        next.add(name);
        return next;
      }),
    [],
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

  return { field, onEdit, formMessage };
}

/** Reads a form's named inputs as strings. */
export function formValues(form: HTMLFormElement): Record<string, string> {
  const out: Record<string, string> = {};
  new FormData(form).forEach((v, k) => {
    if (typeof v === 'string') out[k] = v;
  });
  return out;
}
