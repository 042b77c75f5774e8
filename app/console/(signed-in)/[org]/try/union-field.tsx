"use client";

import { useMemo, useState } from "react";
import { useWatch, type Control, type UseFormRegister, type UseFormSetValue } from "react-hook-form";
import { InlineCode } from "@/components/inline-code";
import { errorText, hintBase, inputBase, selectBase } from "@/components/console/ui";
import { optionValue, rangeHint, type FieldSpec, type FormValues, type UnionSpec } from "@/lib/console-client/schema-form";
import { messagesByPart, pickerText, readPicker, switchVariant, withField } from "@/lib/console-client/union-picker";

function SubField({ f, id, value, onChange, error }: { f: FieldSpec; id: string; value: string | boolean; onChange: (v: string | boolean) => void; error?: string }) {
  const hintId = `${id}-hint`;
  const errId = `${id}-err`;
  const range = rangeHint(f);
  const defaultText = f.default !== undefined ? ` Default: ${typeof f.default === "string" ? f.default : JSON.stringify(f.default)}.` : "";
  const hasHint = Boolean(f.description || range || defaultText);
  const common = {
    id,
    "aria-invalid": error ? true : undefined,
    "aria-describedby": [hasHint ? hintId : null, error ? errId : null].filter(Boolean).join(" ") || undefined,
  };
  const hint = hasHint ? (
    <p id={hintId} className={`${hintBase} ${f.kind === "boolean" ? "ml-6" : ""}`}>
      {f.description ? <InlineCode text={f.description} /> : null}
      {range ? ` Range: ${range}.` : ""}
      {defaultText}
    </p>
  ) : null;
  const err = error ? (
    <p id={errId} className={`${errorText} ${f.kind === "boolean" ? "ml-6" : ""}`}>
      {error}
    </p>
  ) : null;
  const kind = f.kind === "json" ? (f.takesString ? "text or JSON" : `${f.shape}, as JSON`) : f.kind;
  const label = (
    <>
      <code className="font-mono">{f.name}</code>
      <span className="ml-2 text-xs font-normal text-ink-2">
        {kind}
        {f.required ? " · required" : " · optional"}
      </span>
    </>
  );

  if (f.kind === "boolean") {
    return (
      <div>
        <div className="flex items-start gap-2">
          <input type="checkbox" className="mt-1 h-4 w-4 accent-accent" checked={value === true} onChange={(e) => onChange(e.target.checked)} {...common} />
          <label htmlFor={id} className="text-sm font-medium">
            {label}
          </label>
        </div>
        {hint}
        {err}
      </div>
    );
  }
  const text = typeof value === "string" ? value : "";
  let control;
  if (f.kind === "enum") {
    control = (
      <select className={`${selectBase} mt-1 max-w-xs font-mono`} value={text} onChange={(e) => onChange(e.target.value)} {...common}>
        <option value="">{f.required ? "— choose —" : "— not sent —"}</option>
        {(f.options ?? []).map((o) => (
          <option key={optionValue(o)} value={optionValue(o)}>
            {typeof o === "string" ? o : JSON.stringify(o)}
          </option>
        ))}
      </select>
    );
  } else if (f.kind === "number" || f.kind === "integer") {
    control = (
      <input
        type="number"
        step={f.kind === "integer" ? 1 : "any"}
        min={f.minimum && !f.minimum.exclusive ? f.minimum.value : undefined}
        max={f.maximum && !f.maximum.exclusive ? f.maximum.value : undefined}
        inputMode={f.kind === "integer" ? "numeric" : "decimal"}
        className={`${inputBase} mt-1 max-w-xs font-mono`}
        value={text}
        onChange={(e) => onChange(e.target.value)}
        {...common}
      />
    );
  } else if (f.kind === "json" && f.shape === "array") {
    control = (
      <textarea
        rows={3}
        spellCheck={false}
        autoComplete="off"
        className={`${inputBase} mt-1 resize-y font-mono text-[0.8125rem]`}
        value={text}
        onChange={(e) => onChange(e.target.value)}
        {...common}
      />
    );
  } else {
    control = (
      <input type="text" spellCheck={false} autoComplete="off" className={`${inputBase} mt-1 font-mono`} value={text} onChange={(e) => onChange(e.target.value)} {...common} />
    );
  }
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium">
        {label}
      </label>
      {control}
      {hint}
      {err}
    </div>
  );
}

/**
 * A JSON field whose schema is a union told apart by one property (a code's `family`): a select for
 * that property, then the chosen shape's own fields, and the JSON itself under a disclosure. The
 * JSON text in the form is the value; the fields read it when it parses and write it when they change.
 */
export function UnionField({
  f,
  union,
  id,
  control,
  register,
  setValue,
  examples,
  error,
  server,
}: {
  f: FieldSpec;
  union: UnionSpec;
  id: string;
  control: Control<FormValues, unknown, Record<string, unknown>>;
  register: UseFormRegister<FormValues>;
  setValue: UseFormSetValue<FormValues>;
  examples: readonly unknown[];
  error?: string;
  server?: string[];
}) {
  const text = String(useWatch({ control, name: f.name }) ?? "");
  const read = useMemo(() => readPicker(union, text), [union, text]);
  // What each field shows: the JSON's values, except while a field holds text that is not a value yet.
  const [drafts, setDrafts] = useState<{ basis: string; values: FormValues; errors: Record<string, string> }>(() => ({
    basis: text,
    values: read.ok ? read.values : {},
    errors: {},
  }));
  const [lastVariant, setLastVariant] = useState(read.ok ? read.variant : undefined);
  const [jsonOpen, setJsonOpen] = useState(false);
  if (drafts.basis !== text && read.ok) {
    // The JSON changed under the fields (typed in the box, an example, a reset): the fields follow it.
    setDrafts({ basis: text, values: read.values, errors: {} });
    if (read.variant !== lastVariant) setLastVariant(read.variant);
  }
  const variant = read.ok ? read.variant : lastVariant;
  const current = union.variants.find((v) => v.value === variant);
  const blocked = !read.ok && !read.empty;

  function write(next: Record<string, unknown>, values: FormValues, errors: Record<string, string> = {}) {
    const t = pickerText(next);
    setDrafts({ basis: t, values, errors });
    setValue(f.name, t, { shouldDirty: true });
  }

  function pickVariant(v: string) {
    if (blocked) return;
    const next = switchVariant(union, read.ok ? read.value : undefined, v, examples);
    setLastVariant(v);
    const after = readPicker(union, JSON.stringify(next));
    write(next, after.ok ? after.values : {});
  }

  function change(sub: FieldSpec, raw: string | boolean) {
    if (!read.ok) return;
    const values = { ...drafts.values, [sub.name]: raw };
    const r = withField(read.value, sub, raw);
    if ("error" in r) {
      setDrafts({ ...drafts, values, errors: { ...drafts.errors, [sub.name]: r.error } });
      return;
    }
    const errors = { ...drafts.errors };
    delete errors[sub.name];
    write(r.value, values, errors);
  }

  // Problems inside the code show at the parameter they name; the rest under the whole field.
  const shownParts = current?.fields.map((x) => x.name) ?? [];
  const checked = messagesByPart(f.name, error ? error.split(" · ") : [], shownParts);
  const answered = messagesByPart(f.name, server ?? [], shownParts);
  const partError = (name: string) =>
    [drafts.errors[name], ...(checked.parts[name] ?? []), ...(answered.parts[name] ?? []).map((m) => `Server: ${m}`)].filter(Boolean).join(" · ") || undefined;
  const ownError = checked.rest.join(" · ") || undefined;
  const ownServer = answered.rest;
  const statusId = `${id}-status`;
  const errId = `${id}-err`;
  const invalid = Boolean(ownError || ownServer.length);
  return (
    <fieldset className="min-w-0 rounded-md border border-rule p-3" aria-describedby={invalid ? errId : undefined}>
      <legend className="px-1 text-sm font-medium">
        <code className="font-mono">{f.name}</code>
        <span className="ml-2 text-xs font-normal text-ink-2">
          {f.description ? <InlineCode text={f.description} /> : "object"}
          {f.required ? " · required" : " · optional"}
        </span>
      </legend>
      <div className="flex flex-col gap-3">
        <div>
          <label htmlFor={`${id}-variant`} className="block text-sm font-medium">
            <code className="font-mono">{union.discriminator}</code>
            <span className="ml-2 text-xs font-normal text-ink-2">picks the parameters below · required</span>
          </label>
          <select
            id={`${id}-variant`}
            className={`${selectBase} mt-1 max-w-xs font-mono`}
            value={variant ?? ""}
            disabled={blocked}
            aria-describedby={blocked ? statusId : undefined}
            onChange={(e) => pickVariant(e.target.value)}
          >
            <option value="" disabled>
              — choose —
            </option>
            {union.variants.map((v) => (
              <option key={v.value} value={v.value}>
                {v.value}
              </option>
            ))}
          </select>
          {current?.description ? (
            <p className={hintBase}>
              <InlineCode text={current.description} />
            </p>
          ) : null}
        </div>
        {!read.ok ? (
          <p id={statusId} role="status" className="rounded-md border border-caution-rule bg-caution-bg px-3 py-2 text-xs text-caution-ink">
            {read.message}
          </p>
        ) : null}
        {read.ok && read.variant === undefined ? (
          <p role="status" className="rounded-md border border-caution-rule bg-caution-bg px-3 py-2 text-xs text-caution-ink">
            The JSON&apos;s <code className="font-mono">{union.discriminator}</code> is not one of the listed values; choose one above.
          </p>
        ) : null}
        {current && current.fields.length > 0 ? (
          <fieldset disabled={blocked} className="flex min-w-0 flex-col gap-3 border-l-2 border-rule pl-3">
            <legend className="sr-only">Parameters of {current.value}</legend>
            {current.fields.map((sub) => (
              <SubField
                key={`${current.value}.${sub.name}`}
                f={sub}
                id={`${id}-${current.value}-${sub.name}`}
                value={drafts.values[sub.name] ?? (sub.kind === "boolean" ? false : "")}
                onChange={(v) => change(sub, v)}
                error={partError(sub.name)}
              />
            ))}
          </fieldset>
        ) : null}
        {read.ok && read.unknown.length > 0 ? (
          <p className={hintBase}>
            Also in the JSON, not a parameter of {read.variant}: {read.unknown.map((k) => `\`${k}\``).join(", ")} (the check below says whether it is accepted).
          </p>
        ) : null}
        <details open={jsonOpen} onToggle={(e) => setJsonOpen(e.currentTarget.open)} className="text-sm">
          <summary className="cursor-pointer text-accent">Edit {f.name} as JSON</summary>
          <label htmlFor={id} className="sr-only">
            {f.name} as JSON
          </label>
          <textarea
            id={id}
            rows={Math.min(12, Math.max(2, text.split("\n").length + 1))}
            spellCheck={false}
            autoComplete="off"
            aria-invalid={invalid || blocked ? true : undefined}
            aria-describedby={blocked ? statusId : undefined}
            className={`${inputBase} mt-2 resize-y font-mono text-[0.8125rem] leading-relaxed`}
            {...register(f.name)}
          />
        </details>
        {invalid ? (
          <p id={errId} className={errorText}>
            {ownError ?? null}
            {ownServer.length ? (
              <>
                {ownError ? <br /> : null}
                Server: {ownServer.join(" · ")}
              </>
            ) : null}
          </p>
        ) : null}
      </div>
    </fieldset>
  );
}
