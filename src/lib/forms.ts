// Forms validate in the browser with the same zod schema the server uses, and show the
// server's own field errors (`error.fields`) beside the same inputs.
import { useState, type ChangeEvent, type FormEvent } from "react";
import type { z } from "zod";
import { ApiError } from "./api";

export type FieldErrors = Record<string, string>;

/** One message per field, named like the server names them (nested paths joined with dots). */
export function issuesToFieldErrors(error: z.ZodError): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.map(String).join(".") : "_";
    if (!fields[key]) fields[key] = issue.message;
  }
  return fields;
}

/** The sentence above a form after the server refused it; null when field messages say it all. */
export function formLevelMessage(error: unknown): string | null {
  if (!error) return null;
  if (error instanceof ApiError) {
    if (error.code === "validation_failed" && Object.keys(error.fields).length > 0) return "Check the fields marked below.";
    return error.message;
  }
  return error instanceof Error ? error.message : "Something went wrong.";
}

type Values = Record<string, string>;

export interface FieldProps {
  name: string;
  value: string;
  error: string | undefined;
  onChange: (event: ChangeEvent<HTMLInputElement | HTMLTextAreaElement | HTMLSelectElement>) => void;
}

export function useZodForm<S extends z.ZodType, V extends Values>(schema: S, initialValues: V) {
  const [values, setValues] = useState<V>(initialValues);
  const [errors, setErrors] = useState<FieldErrors>({});

  function setValue(name: keyof V & string, value: string) {
    setValues((current) => ({ ...current, [name]: value }));
    // An edited field's old message no longer describes it.
    setErrors((current) => {
      if (!(name in current)) return current;
      const next = { ...current };
      delete next[name];
      return next;
    });
  }

  function field(name: keyof V & string): FieldProps {
    return {
      name,
      value: values[name],
      error: errors[name],
      onChange: (event) => setValue(name, event.target.value),
    };
  }

  /** Validates on submit; calls `onValid` with the schema's output (trimmed, lower-cased...). */
  function handleSubmit(onValid: (data: z.output<S>) => void) {
    return (event: FormEvent<HTMLFormElement>) => {
      event.preventDefault();
      const result = schema.safeParse(values);
      if (!result.success) {
        const fieldErrors = issuesToFieldErrors(result.error);
        setErrors(fieldErrors);
        focusFirstInvalid(event.currentTarget, fieldErrors);
        return;
      }
      setErrors({});
      onValid(result.data);
    };
  }

  /** Puts the server's field messages beside the inputs (pass as a mutation's onError). */
  function showServerErrors(error: unknown) {
    if (error instanceof ApiError && Object.keys(error.fields).length > 0) setErrors(error.fields);
  }

  function reset(next: V = initialValues) {
    setValues(next);
    setErrors({});
  }

  return { values, errors, field, setValue, handleSubmit, showServerErrors, reset };
}

function focusFirstInvalid(form: HTMLFormElement, fieldErrors: FieldErrors) {
  for (const name of Object.keys(fieldErrors)) {
    const element = form.elements.namedItem(name);
    if (element instanceof HTMLElement) {
      element.focus();
      return;
    }
  }
}
