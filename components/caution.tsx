/** The standing notice that results are engineering estimates, not certification evidence. */
export function Caution({ compact = false }: { compact?: boolean }) {
  return (
    <aside
      aria-labelledby="caution-heading"
      className="rounded-lg border border-caution-rule border-l-[6px] bg-caution-bg px-5 py-4 text-caution-ink"
    >
      <h2 id="caution-heading" className={compact ? "text-sm font-semibold" : "text-base font-semibold"}>
        Estimates, not certification
      </h2>
      <p className={compact ? "mt-1 text-sm" : "mt-1.5"}>
        Every number Paritas returns is an engineering estimate under the model you state. For
        safety-critical links — medical, aviation, automotive, public safety — defer to the
        applicable standards, certification bodies and licensed practice. A verdict from this API is
        not evidence of compliance.
      </p>
    </aside>
  );
}
