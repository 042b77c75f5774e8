import { parse } from "csv-parse/sync";
import { PDFParse } from "pdf-parse";
import { describe, expect, it } from "vitest";
import { remaining } from "@/lib/billing/invoice-amounts";
import { decimalAmount, invoiceCsv, invoicePdf } from "@/lib/billing/invoice-documents";
import type { InvoiceDetail } from "@/lib/billing/views";

// A Beacon month with overage, by hand: $39.00 fee + 51,073 units beyond 40,000 at 2¢ ($1,021.46) − a $2.50 credit = $1,057.96.
const invoice: InvoiceDetail = {
  id: "in_test_0001",
  number: "PRT-2026-0011",
  status: "open",
  currency: "usd",
  periodStart: "2026-11-01T00:00:00.000Z",
  periodEnd: "2026-12-01T00:00:00.000Z",
  total: 3_900 + 102_146 - 250,
  amountDue: 3_900 + 102_146 - 250,
  amountPaid: 0,
  createdAt: "2026-12-01T00:04:10.000Z",
  paidAt: null,
  org: { name: "Brinewatch Marine Telemetry", slug: "brinewatch" },
  plan: "beacon",
  lines: [
    { description: "Beacon plan, November 2026", quantity: 1, unitAmount: 3_900, amount: 3_900, periodStart: "2026-11-01T00:00:00.000Z", periodEnd: "2026-12-01T00:00:00.000Z" },
    { description: "Compute units beyond 40,000", quantity: 51_073, unitAmount: 2, amount: 102_146, periodStart: "2026-11-01T00:00:00.000Z", periodEnd: "2026-12-01T00:00:00.000Z" },
    { description: 'Credit for the "p = 1e-3" rerun, as agreed', quantity: 1, unitAmount: null, amount: -250, periodStart: "2026-11-01T00:00:00.000Z", periodEnd: "2026-12-01T00:00:00.000Z" },
  ],
};

async function pdfText(pdf: Buffer): Promise<{ text: string; info: Record<string, unknown> }> {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  try {
    const text = await parser.getText();
    const info = await parser.getInfo();
    return { text: text.text, info: (info.info ?? {}) as Record<string, unknown> };
  } finally {
    await parser.destroy();
  }
}

/** The text with every run of whitespace as one space, so a line the layout broke still matches. */
const flat = (s: string) => s.replace(/\s+/g, " ");

describe("decimalAmount", () => {
  it("writes cents as dollars by integer arithmetic (hand-checked values)", () => {
    expect(decimalAmount(14_146)).toBe("141.46");
    expect(decimalAmount(3_900)).toBe("39.00");
    expect(decimalAmount(7)).toBe("0.07");
    expect(decimalAmount(0)).toBe("0.00");
    expect(decimalAmount(-250)).toBe("-2.50");
    expect(decimalAmount(123_456_789_01)).toBe("123456789.01");
  });

  it("refuses an amount that is not whole cents", () => {
    expect(() => decimalAmount(1.5)).toThrow(RangeError);
  });
});

describe("invoiceCsv", () => {
  // csv-parse (the npm package) reads the file as RFC 4180 with strict quoting and column counts.
  const read = (csv: string) => parse(csv, { relax_quotes: false, relax_column_count: false, record_delimiter: "\r\n" }) as string[][];

  it("parses back as a header, one row per line item and a total row", () => {
    const rows = read(invoiceCsv(invoice));
    expect(rows[0]).toEqual(["description", "period_start", "period_end", "quantity", "unit_price", "amount", "currency"]);
    expect(rows).toHaveLength(1 + invoice.lines.length + 1);
    expect(rows[1]).toEqual(["Beacon plan, November 2026", "2026-11-01", "2026-12-01", "1", "39.00", "39.00", "usd"]);
    expect(rows[2]).toEqual(["Compute units beyond 40,000", "2026-11-01", "2026-12-01", "51073", "0.02", "1021.46", "usd"]);
    expect(rows.at(-1)).toEqual(["Total", "2026-11-01", "2026-12-01", "", "", "1057.96", "usd"]);
  });

  it("keeps a description with a comma and quotes whole", () => {
    const rows = read(invoiceCsv(invoice));
    expect(rows[3]![0]).toBe('Credit for the "p = 1e-3" rerun, as agreed');
    expect(rows[3]![4]).toBe("");
    expect(rows[3]![5]).toBe("-2.50");
  });

  it("has line amounts that add up to the total row, counted in cents", () => {
    const rows = read(invoiceCsv(invoice));
    const cents = (s: string) => {
      const m = /^(-?)(\d+)\.(\d{2})$/.exec(s);
      if (!m) throw new Error(`not a decimal amount: ${s}`);
      return (m[1] ? -1 : 1) * (Number(m[2]) * 100 + Number(m[3]));
    };
    const lines = rows.slice(1, -1).map((r) => cents(r[5]!));
    expect(lines.reduce((a, b) => a + b, 0)).toBe(cents(rows.at(-1)![5]!));
    expect(cents(rows.at(-1)![5]!)).toBe(105_796);
  });

  it("ends every record with CRLF", () => {
    const csv = invoiceCsv(invoice);
    expect(csv.endsWith("\r\n")).toBe(true);
    expect(csv.split("\r\n")).toHaveLength(invoice.lines.length + 3);
    expect(csv.replaceAll("\r\n", "")).not.toMatch(/[\r\n]/);
  });

  it("writes an invoice without lines as a header and a total", () => {
    const rows = read(invoiceCsv({ ...invoice, lines: [], total: 0, amountDue: 0 }));
    expect(rows).toEqual([rows[0], ["Total", "2026-11-01", "2026-12-01", "", "", "0.00", "usd"]]);
  });
});

describe("invoicePdf", () => {
  it("holds the organisation, number, status, period, every line and the totals (text read back with pdf-parse)", async () => {
    const { text } = await pdfText(await invoicePdf(invoice));
    const t = flat(text);
    for (const s of [
      "Brinewatch Marine Telemetry",
      "PRT-2026-0011",
      "Open: awaiting payment",
      "1 November 2026 – 30 November 2026",
      "Beacon plan, November 2026",
      "Compute units beyond 40,000",
      '"p = 1e-3"',
      "51,073",
      "$0.02",
      "$39.00",
      "$1,021.46",
      "−$2.50",
      "$1,057.96",
      "$0.00",
    ]) {
      expect(t).toContain(s);
    }
    expect(t).toMatch(/Total\s*\$1,057\.96/);
    expect(t).toMatch(/Amount remaining\s*\$1,057\.96/);
    expect(t).toMatch(/Amount paid\s*\$0\.00/);
  });

  it("shows a paid invoice's date and amounts with cents", async () => {
    const paid: InvoiceDetail = {
      ...invoice,
      status: "paid",
      total: 14_146,
      amountPaid: 14_146,
      // The provider keeps the whole amount as due once it is paid.
      amountDue: 14_146,
      paidAt: "2026-12-02T09:00:00.000Z",
      lines: [{ ...invoice.lines[0]!, description: "Lighthouse plan", quantity: 1, unitAmount: 14_146, amount: 14_146 }],
    };
    const t = flat((await pdfText(await invoicePdf(paid))).text);
    expect(t).toContain("Paid on 2 December 2026");
    expect(t).toContain("$141.46");
    expect(t).toMatch(/Amount paid\s*\$141\.46/);
    expect(t).toMatch(/Amount remaining\s*\$0\.00/);
  });

  it("carries its title and author, and dates itself from the invoice", async () => {
    const { info } = await pdfText(await invoicePdf(invoice));
    expect(info.Title).toBe("Paritas invoice PRT-2026-0011");
    expect(info.Author).toBe("Paritas");
    // PDF date string (ISO 32000-1 §7.9.4) of createdAt, 2026-12-01T00:04:10Z.
    expect(String(info.CreationDate)).toMatch(/^D:20261201000410Z/);
  });

  it("gives the same bytes for the same invoice, and other bytes for another", async () => {
    const a = await invoicePdf(invoice);
    const b = await invoicePdf(structuredClone(invoice));
    expect(a.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(Buffer.compare(a, b)).toBe(0);
    const c = await invoicePdf({ ...invoice, number: "PRT-2026-0012" });
    expect(Buffer.compare(a, c)).not.toBe(0);
  });

  it("embeds the app's typeface instead of a standard PDF font", async () => {
    const pdf = (await invoicePdf(invoice)).toString("latin1");
    expect(pdf).toMatch(/\/BaseFont \/[A-Z]{6}\+IBMPlexSans/);
    expect(pdf).toMatch(/\/BaseFont \/[A-Z]{6}\+IBMPlexMono/);
    expect(pdf).not.toContain("/Helvetica");
  });
});

describe("remaining", () => {
  it("is what is due less what was paid, never below zero", () => {
    expect(remaining({ amountDue: 3_900, amountPaid: 0 })).toBe(3_900);
    expect(remaining({ amountDue: 3_900, amountPaid: 3_900 })).toBe(0);
    expect(remaining({ amountDue: 3_900, amountPaid: 1_000 })).toBe(2_900);
    expect(remaining({ amountDue: 0, amountPaid: 3_900 })).toBe(0);
  });
});
