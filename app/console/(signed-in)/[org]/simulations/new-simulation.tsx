"use client";

import { useMutation, useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { useId, useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { ProblemView } from "@/components/console/problem-view";
import { LoadError, Loading } from "@/components/console/states";
import { buttonPrimary, hintBase, inputBase, labelBase, panel, selectBase } from "@/components/console/ui";
import { consoleApi } from "@/lib/console-client/api";
import { toProblem } from "@/lib/console-client/problem";
import { queryKeys } from "@/lib/console-client/query-keys";
import { planForm, type FieldSpec, type FormValues } from "@/lib/console-client/schema-form";
import { UnionField } from "../try/union-field";

/** The form's channels: the API's channel and, on AWGN, its modulation in one choice. */
const CHANNELS = {
  bsc: { label: "BSC (points: crossover probability p)", channel: { type: "bsc" } },
  bec: { label: "BEC (points: erasure probability ε)", channel: { type: "bec" } },
  "awgn-bpsk": { label: "AWGN, BPSK (points: Eb/N0 in dB)", channel: { type: "awgn", modulation: "bpsk" } },
  "awgn-qpsk": { label: "AWGN, Gray QPSK (points: Eb/N0 in dB)", channel: { type: "awgn", modulation: "qpsk" } },
} as const;
type ChannelKey = keyof typeof CHANNELS;

const DEFAULTS: FormValues = {
  coded: true,
  code: JSON.stringify({ family: "hamming", r: 3 }),
  channel: "bsc",
  decisions: "hard",
  points: "0.05, 0.02, 0.01, 0.005",
  minBitErrors: "100",
  maxBits: "10000000",
  minFrameErrors: "",
  maxSeconds: "",
  confidence: "0.95",
  seed: "",
};

/** "0.02, 0.01 0.005" → numbers; NaN where a piece is not a number (the server names the bad one). */
const parsePoints = (text: string) =>
  text
    .split(/[\s,;]+/)
    .filter(Boolean)
    .map(Number);

const optionalNumber = (text: string | boolean | undefined) => (typeof text === "string" && text.trim() !== "" ? Number(text) : undefined);

/** The request body POST /simulations takes, from the form's values (the server validates it). */
function bodyOf(v: FormValues): Record<string, unknown> {
  const key = String(v.channel) as ChannelKey;
  const channel: Record<string, unknown> = { ...CHANNELS[key].channel };
  if (channel.type === "awgn") channel.decisions = v.decisions;
  const stop = Object.fromEntries(
    (["minBitErrors", "maxBits", "minFrameErrors", "maxSeconds"] as const).map((k) => [k, optionalNumber(v[k])]).filter(([, n]) => n !== undefined),
  );
  let code: unknown;
  if (v.coded) {
    try {
      code = JSON.parse(String(v.code));
    } catch {
      code = String(v.code);
    }
  }
  return { ...(code !== undefined ? { code } : {}), channel, points: parsePoints(String(v.points)), stop, confidence: optionalNumber(v.confidence), seed: optionalNumber(v.seed) };
}

function Field({ id, label, hint, children }: { id: string; label: string; hint?: string; children: React.ReactNode }) {
  return (
    <div className="min-w-0">
      <label htmlFor={id} className={labelBase}>
        {label}
      </label>
      {children}
      {hint ? (
        <p id={`${id}-hint`} className={hintBase}>
          {hint}
        </p>
      ) : null}
    </div>
  );
}

/** Start a simulation: the bench's code picker, a channel, the sweep, stopping rules and an optional seed. */
export function NewSimulation({ org, onStarted }: { org: string; onStarted: () => void }) {
  const id = useId();
  const endpoints = useQuery({ queryKey: queryKeys.endpoints, queryFn: ({ signal }) => consoleApi.endpoints(signal), staleTime: 5 * 60_000 });
  const create = endpoints.data?.endpoints.find((e) => e.id === "simulations.create");
  const codeField = useMemo<FieldSpec | undefined>(() => {
    if (!create) return undefined;
    const plan = planForm(create.inputSchema);
    return plan.kind === "fields" ? plan.fields.find((f) => f.name === "code") : undefined;
  }, [create]);
  const codeExamples = useMemo(() => Object.values(create?.examples ?? {}).map((e) => (e.value as Record<string, unknown> | undefined)?.code), [create]);
  const { register, control, setValue, handleSubmit, getValues } = useForm<FormValues, unknown, Record<string, unknown>>({ defaultValues: DEFAULTS });
  const [started, setStarted] = useState<string | null>(null);
  const start = useMutation({
    mutationFn: (v: FormValues) => consoleApi.startSimulation(org, bodyOf(v)),
    onSuccess: (out) => {
      setStarted(out.simulation.id);
      onStarted();
    },
  });
  const coded = useWatch({ control, name: "coded" }) === true;
  const channel = String(useWatch({ control, name: "channel" })) as ChannelKey;
  const problem = start.isError ? toProblem(start.error) : null;
  const codeServer = problem?.errors?.filter((e) => e.pointer.startsWith("/code")).map((e) => `${e.pointer}: ${e.message}`);

  return (
    <section aria-labelledby={`${id}-title`} className={`${panel} p-4`}>
      <h2 id={`${id}-title`} className="text-lg font-semibold">
        New simulation
      </h2>
      <p className="mt-1 text-sm text-ink-2">Each point runs until one of its stopping rules holds. The same request and seed give the same counts.</p>
      {endpoints.isPending ? <Loading label="Loading the code families" rows={2} /> : null}
      {endpoints.isError ? <LoadError error={endpoints.error} onRetry={() => void endpoints.refetch()} what="the code families" /> : null}
      {codeField?.union ? (
        <form noValidate aria-label="New simulation" className="mt-4 flex flex-col gap-4" onSubmit={handleSubmit(() => start.mutate(getValues()))}>
          <div className="flex items-center gap-2">
            <input id={`${id}-coded`} type="checkbox" className="h-4 w-4" {...register("coded")} />
            <label htmlFor={`${id}-coded`} className="text-sm font-medium">
              With a code (untick for uncoded transmission)
            </label>
          </div>
          {coded ? (
            <UnionField f={codeField} union={codeField.union} id={`${id}-code`} control={control} register={register} setValue={setValue} examples={codeExamples} server={codeServer} />
          ) : null}
          <div className="grid gap-4 sm:grid-cols-2">
            <Field id={`${id}-channel`} label="Channel">
              <select id={`${id}-channel`} className={`${selectBase} mt-1`} {...register("channel")}>
                {Object.entries(CHANNELS).map(([k, c]) => (
                  <option key={k} value={k}>
                    {c.label}
                  </option>
                ))}
              </select>
            </Field>
            {channel.startsWith("awgn") ? (
              <Field id={`${id}-decisions`} label="Decisions">
                <select id={`${id}-decisions`} className={`${selectBase} mt-1`} {...register("decisions")}>
                  <option value="hard">hard: each bit decided, then the decoder</option>
                  <option value="soft">soft: maximum likelihood by correlation (k ≤ 12)</option>
                </select>
              </Field>
            ) : null}
          </div>
          <Field id={`${id}-points`} label="Points" hint={channel.startsWith("awgn") ? "Eb/N0 in dB, separated by commas (at most 16)." : "Probabilities from 0 to 1, separated by commas (at most 16)."}>
            <input id={`${id}-points`} className={`${inputBase} mt-1 font-mono`} aria-describedby={`${id}-points-hint`} {...register("points")} />
          </Field>
          <fieldset className="min-w-0 rounded-md border border-rule p-3">
            <legend className="px-1 text-sm font-medium">Stopping rules (whichever comes first, per point)</legend>
            <div className="grid gap-3 sm:grid-cols-2">
              <Field id={`${id}-minBitErrors`} label="Bit errors seen">
                <input id={`${id}-minBitErrors`} inputMode="numeric" className={`${inputBase} mt-1`} {...register("minBitErrors")} />
              </Field>
              <Field id={`${id}-maxBits`} label="Information bits at most">
                <input id={`${id}-maxBits`} inputMode="numeric" className={`${inputBase} mt-1`} {...register("maxBits")} />
              </Field>
              <Field id={`${id}-minFrameErrors`} label="Frame errors seen (optional)">
                <input id={`${id}-minFrameErrors`} inputMode="numeric" className={`${inputBase} mt-1`} {...register("minFrameErrors")} />
              </Field>
              <Field id={`${id}-maxSeconds`} label="Seconds at most (optional)">
                <input id={`${id}-maxSeconds`} inputMode="decimal" className={`${inputBase} mt-1`} {...register("maxSeconds")} />
              </Field>
            </div>
          </fieldset>
          <div className="grid gap-4 sm:grid-cols-2">
            <Field id={`${id}-confidence`} label="Confidence of the intervals">
              <input id={`${id}-confidence`} inputMode="decimal" className={`${inputBase} mt-1`} {...register("confidence")} />
            </Field>
            <Field id={`${id}-seed`} label="Seed (optional)" hint="Left empty, one is drawn and shown with the result.">
              <input id={`${id}-seed`} inputMode="numeric" className={`${inputBase} mt-1`} aria-describedby={`${id}-seed-hint`} {...register("seed")} />
            </Field>
          </div>
          {problem ? (
            <div role="alert">
              <ProblemView problem={problem} compact />
            </div>
          ) : null}
          <div className="flex flex-wrap items-center gap-3">
            <button type="submit" className={buttonPrimary} disabled={start.isPending}>
              {start.isPending ? "Starting…" : "Start simulation"}
            </button>
            {started && !start.isPending && !problem ? (
              <p role="status" className="text-sm">
                Started <Link href={`/console/${org}/simulations/${started}`} className="font-mono">{started}</Link>: it is in the list below.
              </p>
            ) : null}
          </div>
        </form>
      ) : null}
    </section>
  );
}
