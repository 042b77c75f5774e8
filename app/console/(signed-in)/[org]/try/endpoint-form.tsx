"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useId, useMemo, useState } from "react";
import { useForm, type UseFormRegister } from "react-hook-form";
import { InlineCode } from "@/components/inline-code";
import { IconPlay } from "@/components/console/icons";
import { buttonPrimary, buttonSecondary, errorText, hintBase, inputBase, selectBase } from "@/components/console/ui";
import type { FieldProblem } from "@/lib/console-client/problem";
import {
  activeFields,
  bodySchemaOf,
  buildFormSchema,
  optionValue,
  planForm,
  rangeHint,
  RAW_FIELD,
  shortLabel,
  valuesFor,
  variantOf,
  type FieldSpec,
  type FormPlan,
  type FormValues,
} from "@/lib/console-client/schema-form";
import type { EndpointInfo } from "@/lib/console-client/types";
import { UnionField } from "./union-field";

type Body = Record<string, unknown>;

/** Where a problem's field pointer lands in the form: the top-level field it starts with. */
function topField(pointer: string, plan: FormPlan): string {
  if (plan.kind === "raw") return RAW_FIELD;
  const first = pointer.split("/")[1];
  return first ? first.replace(/~1/g, "/").replace(/~0/g, "~") : "root";
}

function Field({
  f,
  id,
  register,
  error,
  server,
  initialLines,
}: {
  f: FieldSpec;
  id: string;
  register: UseFormRegister<FormValues>;
  error?: string;
  server?: string[];
  initialLines: number;
}) {
  const hintId = `${id}-hint`;
  const errId = `${id}-err`;
  const invalid = Boolean(error || server?.length);
  const describedBy = [f.description || f.kind === "json" || rangeHint(f) ? hintId : null, invalid ? errId : null].filter(Boolean).join(" ") || undefined;
  const common = { id, "aria-invalid": invalid ? true : undefined, "aria-describedby": describedBy };
  const label =
    f.name === RAW_FIELD ? (
      "Request body (JSON)"
    ) : (
      <>
        <code className="font-mono">{f.name}</code>
        <span className="ml-2 text-xs font-normal text-ink-2">
          {f.kind === "json" ? `${f.shape}, as JSON` : f.kind}
          {f.required ? " · required" : " · optional"}
        </span>
      </>
    );

  let control;
  switch (f.kind) {
    case "number":
    case "integer":
      control = (
        <input
          type="number"
          step={f.kind === "integer" ? 1 : "any"}
          // The browser's min/max are inclusive, so only inclusive ends go there; the schema checks the rest.
          min={f.minimum && !f.minimum.exclusive ? f.minimum.value : undefined}
          max={f.maximum && !f.maximum.exclusive ? f.maximum.value : undefined}
          inputMode={f.kind === "integer" ? "numeric" : "decimal"}
          className={`${inputBase} mt-1 max-w-xs font-mono`}
          {...common}
          {...register(f.name)}
        />
      );
      break;
    case "enum":
      control = (
        <select className={`${selectBase} mt-1 max-w-xs font-mono`} {...common} {...register(f.name)}>
          <option value="">{f.required ? "— choose —" : "— not sent —"}</option>
          {(f.options ?? []).map((o) => (
            <option key={optionValue(o)} value={optionValue(o)}>
              {typeof o === "string" ? o : JSON.stringify(o)}
            </option>
          ))}
        </select>
      );
      break;
    case "boolean":
      return (
        <div>
          <div className="flex items-start gap-2">
            <input type="checkbox" className="mt-1 h-4 w-4 accent-accent" {...common} {...register(f.name)} />
            <label htmlFor={id} className="text-sm font-medium">
              {label}
            </label>
          </div>
          {f.description ? (
            <p id={hintId} className={`${hintBase} ml-6`}>
              <InlineCode text={f.description} />
              {f.default !== undefined ? ` Default: ${String(f.default)}.` : ""}
            </p>
          ) : null}
          {invalid ? (
            <p id={errId} className={`${errorText} ml-6`}>
              {error ?? `Server: ${server?.join(" · ")}`}
            </p>
          ) : null}
        </div>
      );
    case "string":
      control = <input type="text" spellCheck={false} autoComplete="off" className={`${inputBase} mt-1 font-mono`} {...common} {...register(f.name)} />;
      break;
    case "json":
      control = (
        <textarea
          rows={Math.min(f.name === RAW_FIELD ? 20 : 14, Math.max(3, initialLines + 1))}
          spellCheck={false}
          autoComplete="off"
          className={`${inputBase} mt-1 resize-y font-mono text-[0.8125rem] leading-relaxed`}
          {...common}
          {...register(f.name)}
        />
      );
      break;
  }

  return (
    <div>
      <label htmlFor={id} className="block text-sm font-medium">
        {label}
      </label>
      {control}
      {f.description || f.kind === "json" || rangeHint(f) ? (
        <p id={hintId} className={hintBase}>
          {f.description ? <InlineCode text={f.description} /> : null}
          {rangeHint(f) ? ` Range: ${rangeHint(f)}.` : ""}
          {f.kind === "json" && !f.description ? "Any JSON the schema accepts; leave empty to omit." : ""}
        </p>
      ) : null}
      {invalid ? (
        <p id={errId} className={errorText}>
          {error ? error : null}
          {server?.length ? (
            <>
              {error ? <br /> : null}
              Server: {server.join(" · ")}
            </>
          ) : null}
        </p>
      ) : null}
    </div>
  );
}

function FieldsForm({
  plan,
  variant,
  seed,
  check,
  onVariant,
  onRun,
  running,
  serverErrors,
  examples,
}: {
  plan: FormPlan;
  variant: string | undefined;
  seed: unknown;
  examples: EndpointInfo["examples"];
  check: { on: boolean; schema: ReturnType<typeof bodySchemaOf> };
  onVariant: (v: string) => void;
  onRun: (body: Body) => void;
  running: boolean;
  serverErrors?: FieldProblem[];
}) {
  const idBase = useId();
  // A union field's picker starts a newly chosen shape from the endpoint's own example of it.
  const examplesOf = (name: string) => Object.values(examples).map((e) => (typeof e.value === "object" && e.value !== null ? (e.value as Body)[name] : undefined));
  const fields = useMemo(() => activeFields(plan, variant), [plan, variant]);
  const defaults = useMemo(() => valuesFor(plan, fields, seed, variant), [plan, fields, seed, variant]);
  const schema = useMemo(() => buildFormSchema(plan, fields, check.on ? check.schema : null), [plan, fields, check.on, check.schema]);
  const { register, handleSubmit, reset, formState, control, setValue } = useForm<FormValues, unknown, Body>({ resolver: zodResolver(schema), defaultValues: defaults });
  const errors = formState.errors as Record<string, { message?: string } | undefined>;

  const server = new Map<string, string[]>();
  for (const e of serverErrors ?? []) {
    const top = topField(e.pointer, plan);
    const target = top === "root" || fields.some((f) => f.name === top) || (plan.kind === "variants" && top === plan.discriminator) ? top : "root";
    server.set(target, [...(server.get(target) ?? []), `${e.pointer || "/"}: ${e.message}`]);
  }
  const rootMessage = errors.root?.message;
  const serverRoot = server.get("root");

  return (
    <form noValidate onSubmit={handleSubmit((body) => onRun(body))} className="flex flex-col gap-4" aria-label="Request">
      {plan.kind === "variants" ? (
        <VariantSelect plan={plan} variant={variant} register={register} onVariant={onVariant} id={`${idBase}-variant`} server={server.get(plan.discriminator)} />
      ) : null}
      {fields.length === 0 ? <p className="text-sm text-ink-2">This endpoint takes no input.</p> : null}
      {fields.map((f) =>
        f.kind === "json" && f.union ? (
          <UnionField
            key={f.name}
            f={f}
            union={f.union}
            id={`${idBase}-${f.name}`}
            control={control}
            register={register}
            setValue={setValue}
            examples={examplesOf(f.name)}
            error={errors[f.name]?.message}
            server={server.get(f.name)}
          />
        ) : (
        <Field
          key={f.name}
          f={f}
          id={`${idBase}-${f.name}`}
          register={register}
          error={errors[f.name]?.message}
          server={server.get(f.name)}
          initialLines={String(defaults[f.name] ?? "").split("\n").length}
        />
        ),
      )}
      {rootMessage || serverRoot ? (
        <p role="alert" className={errorText}>
          {rootMessage}
          {serverRoot ? ` Server: ${serverRoot.join(" · ")}` : ""}
        </p>
      ) : null}
      <div className="flex flex-wrap items-center gap-2 border-t border-rule pt-4">
        <button type="submit" className={buttonPrimary} disabled={running}>
          <IconPlay className="h-4 w-4" />
          {running ? "Running…" : "Run with a test key"}
        </button>
        <button type="button" className={buttonSecondary} onClick={() => reset(defaults)}>
          Reset fields
        </button>
      </div>
    </form>
  );
}

function VariantSelect({
  plan,
  variant,
  register,
  onVariant,
  id,
  server,
}: {
  plan: Extract<FormPlan, { kind: "variants" }>;
  variant: string | undefined;
  register: UseFormRegister<FormValues>;
  onVariant: (v: string) => void;
  id: string;
  server?: string[];
}) {
  const reg = register(plan.discriminator);
  const current = plan.variants.find((v) => v.value === variant);
  return (
    <div className="rounded-md border border-rule bg-sunken/50 p-3">
      <label htmlFor={id} className="block text-sm font-medium">
        <code className="font-mono">{plan.discriminator}</code>
        <span className="ml-2 text-xs font-normal text-ink-2">picks the shape of the request · required</span>
      </label>
      <select
        id={id}
        className={`${selectBase} mt-1 max-w-xs font-mono`}
        {...reg}
        onChange={(e) => {
          void reg.onChange(e);
          onVariant(e.target.value);
        }}
      >
        {plan.variants.map((v) => (
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
      {server?.length ? <p className={errorText}>Server: {server.join(" · ")}</p> : null}
    </div>
  );
}

/**
 * The request form of one endpoint, generated from its input JSON Schema: an example picker, a
 * field per top-level property, and the same schema (through z.fromJSONSchema and zodResolver)
 * checking the request before it leaves the browser, unless the user turns that off to see the
 * server's own problem response.
 */
export function EndpointForm({
  endpoint,
  onRun,
  running,
  serverErrors,
}: {
  endpoint: EndpointInfo;
  onRun: (body: Body) => void;
  running: boolean;
  serverErrors?: FieldProblem[];
}) {
  const plan = useMemo(() => planForm(endpoint.inputSchema), [endpoint]);
  const bodySchema = useMemo(() => bodySchemaOf(endpoint.inputSchema), [endpoint]);
  const examples = endpoint.examples;
  const names = Object.keys(examples);
  const [exampleName, setExampleName] = useState(names[0] ?? "");
  const example = exampleName ? examples[exampleName] : undefined;
  const [variant, setVariant] = useState(() => variantOf(plan, example?.value));
  const [checkOn, setCheckOn] = useState(true);
  const exampleId = useId();
  const checkId = useId();

  function pickExample(name: string) {
    setExampleName(name);
    const v = examples[name]?.value;
    setVariant(variantOf(plan, v) ?? variant);
  }

  function pickVariant(v: string) {
    setVariant(v);
    const match = names.find((n) => variantOf(plan, examples[n]?.value) === v);
    setExampleName(match ?? "");
  }

  const seed = example && (plan.kind !== "variants" || variantOf(plan, example.value) === variant) ? example.value : plan.kind === "variants" ? { [plan.discriminator]: variant } : undefined;

  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 sm:grid-cols-[minmax(0,1fr)_auto] sm:items-end">
        <div>
          <label htmlFor={exampleId} className="block text-sm font-medium">
            Start from an example
          </label>
          <select id={exampleId} className={`${selectBase} mt-1`} value={exampleName} onChange={(e) => pickExample(e.target.value)}>
            {names.map((n) => (
              <option key={n} value={n} title={examples[n]?.summary ?? n}>
                {shortLabel(examples[n]?.summary ?? n)}
              </option>
            ))}
            <option value="">— a blank form —</option>
          </select>
        </div>
        <div className="flex items-center gap-2 text-sm sm:pb-2">
          <input id={checkId} type="checkbox" className="h-4 w-4 accent-accent" checked={checkOn} onChange={(e) => setCheckOn(e.target.checked)} disabled={!bodySchema} />
          <label htmlFor={checkId}>Check in the browser first</label>
        </div>
      </div>
      {example?.summary && shortLabel(example.summary) !== example.summary ? <p className="-mt-2 text-xs text-ink-2">Example: {example.summary}</p> : null}
      {!checkOn ? (
        <p className="-mt-2 text-xs text-ink-2">Off: the request goes out as typed (JSON must still parse), so you can see the server&apos;s problem response for bad input.</p>
      ) : null}
      <FieldsForm
        key={`${exampleName}|${variant ?? ""}`}
        plan={plan}
        variant={variant}
        seed={seed}
        check={{ on: checkOn && bodySchema !== null, schema: bodySchema }}
        onVariant={pickVariant}
        onRun={onRun}
        running={running}
        serverErrors={serverErrors}
        examples={examples}
      />
    </div>
  );
}
