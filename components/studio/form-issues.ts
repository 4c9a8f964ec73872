'use client';

import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';

/** One problem the server reported: `field` is a dotted path into the body it was sent. */
export interface ServerIssue {
  field: string;
  message: string;
}

/**
 * Where a server issue goes on this form: the form field's name, and optionally the
 * words to show instead of the server's (the screen's own words). null: not a field here.
 */
export type IssuePlacer<T extends FieldValues> = (field: string, message: string) => { name: Path<T>; message?: string } | null;

/**
 * Put each server issue next to its field (react-hook-form setError), in the screen's
 * words; several issues of one field are shown together. Returns what no field on the
 * form can show, for the form's own notice.
 */
export function placeServerIssues<T extends FieldValues>(setError: UseFormSetError<T>, issues: readonly ServerIssue[], place: IssuePlacer<T>): string[] {
  const rest: string[] = [];
  const byField = new Map<Path<T>, string[]>();
  for (const issue of issues) {
    const target = place(issue.field, issue.message);
    if (!target) rest.push(issue.message);
    else byField.set(target.name, [...(byField.get(target.name) ?? []), target.message ?? issue.message]);
  }
  let first = true;
  for (const [name, messages] of byField) {
    setError(name, { type: 'server', message: [...new Set(messages)].join(' ') }, { shouldFocus: first });
    first = false;
  }
  return rest;
}

/** The form's notice when the fields carry the detail: a count, never the server's developer summary. */
export function fixFieldsNotice(count: number): string {
  return count === 1 ? 'One value needs a change; see the marked field.' : `${count} values need a change; see the marked fields.`;
}

/**
 * Read a typed number the way people write it: "1 200", "1,200" or "12,5" (a decimal
 * comma when there is no other separator). Empty or not a number: null.
 */
export function parseTypedNumber(text: string): number | null {
  let t = text.trim().replace(/[\s\u00a0\u202f']/g, '').replace(/^−/, '-');
  if (!t) return null;
  if (/^-?\d{1,3}(,\d{3})+(\.\d+)?$/.test(t)) t = t.replace(/,/g, '');
  else if (/^-?\d+,\d+$/.test(t)) t = t.replace(',', '.');
  if (!/^-?(\d+\.?\d*|\.\d+)(e-?\d+)?$/i.test(t)) return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : null;
}
