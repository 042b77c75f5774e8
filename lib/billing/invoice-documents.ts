import path from "node:path";
import PDFDocument from "pdfkit";
import { remaining } from "./invoice-amounts";
import { formatMoney } from "./plans";
import type { InvoiceDetail, InvoiceStatus } from "./views";

/**
 * An invoice as a file a customer keeps: a one-page PDF set in the app's own typeface, and a CSV
 * for spreadsheets. Both read only the InvoiceDetail the console shows, so the three agree.
 */

/** "141.46" from 14146 cents, "-5.00" from -500: integer arithmetic, no separators (spreadsheets parse it). */
export function decimalAmount(cents: number): string {
  if (!Number.isSafeInteger(cents)) throw new RangeError(`an amount in cents must be a whole number, not ${cents}`);
  const abs = Math.abs(cents);
  return `${cents < 0 ? "-" : ""}${Math.trunc(abs / 100)}.${String(abs % 100).padStart(2, "0")}`;
}

const day = (iso: string) => iso.slice(0, 10);

/** One RFC 4180 field: quoted (quotes doubled) when it holds a comma, a quote or a line break. */
function csvField(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replaceAll('"', '""')}"` : s;
}

const CSV_HEADER = ["description", "period_start", "period_end", "quantity", "unit_price", "amount", "currency"];

/**
 * The invoice as RFC 4180 CSV (CRLF line ends): a header row, one row per line item, then a row
 * "Total" with the invoice's total. Amounts are decimal units of the currency (dollars), from cents.
 */
export function invoiceCsv(inv: InvoiceDetail): string {
  const rows: string[][] = [CSV_HEADER];
  for (const l of inv.lines) {
    rows.push([l.description, day(l.periodStart), day(l.periodEnd), String(l.quantity), l.unitAmount === null ? "" : decimalAmount(l.unitAmount), decimalAmount(l.amount), inv.currency]);
  }
  rows.push(["Total", day(inv.periodStart), day(inv.periodEnd), "", "", decimalAmount(inv.total), inv.currency]);
  return rows.map((r) => r.map(csvField).join(",")).join("\r\n") + "\r\n";
}

// WOFF, not the WOFF2 the pages load: fontkit reads WOFF2 but fails to subset it for embedding.
const fontFile = (family: "sans" | "mono", weight: number) =>
  path.join(process.cwd(), "node_modules", "@fontsource", `ibm-plex-${family}`, "files", `ibm-plex-${family}-latin-${weight}-normal.woff`);
const FONTS = { regular: fontFile("sans", 400), strong: fontFile("sans", 600), figures: fontFile("mono", 400) };

const STATUS_WORDS: Record<InvoiceStatus, string> = {
  draft: "Draft",
  open: "Open: awaiting payment",
  paid: "Paid",
  uncollectible: "Uncollectible",
  void: "Void",
};

const longDay = (iso: string) => new Date(iso).toLocaleDateString("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" });

/** The period's last day: the provider's period end is exclusive (the first instant of the next month). */
const periodWords = (start: string, end: string) => `${longDay(start)} – ${longDay(new Date(Date.parse(end) - 1).toISOString())}`;

const INK = "#1b1f24";
const MUTED = "#5b6470";
const RULE = "#c9cdd2";

/**
 * The invoice as an A4 PDF: organisation, number, status, period, the line items (description,
 * quantity, unit price, amount), the total, paid and remaining. Its dates come from the invoice alone,
 * so the same invoice always gives the same bytes.
 */
export function invoicePdf(inv: InvoiceDetail): Promise<Buffer> {
  const issued = new Date(inv.createdAt);
  const title = `Paritas invoice ${inv.number ?? inv.id}`;
  const doc = new PDFDocument({
    // Starting on an embedded font keeps pdfkit from loading its Helvetica metrics from disk.
    font: FONTS.regular,
    size: "A4",
    margin: 56,
    info: { Title: title, Author: "Paritas", Creator: "Paritas", Producer: "Paritas", CreationDate: issued, ModDate: issued },
    lang: "en-GB",
    displayTitle: true,
  });
  doc.registerFont("regular", FONTS.regular);
  doc.registerFont("strong", FONTS.strong);
  doc.registerFont("figures", FONTS.figures);

  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("data", (c: Buffer) => chunks.push(c));
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });

  const left = doc.page.margins.left;
  const width = doc.page.width - left - doc.page.margins.right;
  const money = (cents: number) => formatMoney(cents);

  doc.font("strong").fontSize(20).fillColor(INK).text("Paritas", left, 56);
  doc.font("regular").fontSize(10).fillColor(MUTED).text("Channel-coding math as a service");
  doc.font("strong").fontSize(16).fillColor(INK).text("Invoice", left, 56, { width, align: "right" });
  doc.font("figures").fontSize(10).fillColor(MUTED).text(inv.number ?? inv.id, { width, align: "right" });

  doc.moveDown(2.5);
  const facts: [string, string][] = [
    ["Billed to", inv.org.name],
    ["Status", STATUS_WORDS[inv.status]],
    ["Period", periodWords(inv.periodStart, inv.periodEnd)],
    ["Issued", longDay(inv.createdAt)],
  ];
  if (inv.paidAt) facts.push(["Paid on", longDay(inv.paidAt)]);
  for (const [term, value] of facts) {
    const y = doc.y;
    doc.font("regular").fontSize(10).fillColor(MUTED).text(term, left, y, { width: 90 });
    doc.font("regular").fontSize(10).fillColor(INK).text(value, left + 100, y, { width: width - 100 });
    doc.moveDown(0.3);
  }

  // The table: description takes what the three figure columns leave.
  const cols = { qty: 70, unit: 90, amount: 100 };
  const descWidth = width - cols.qty - cols.unit - cols.amount;
  const x = { desc: left, qty: left + descWidth, unit: left + descWidth + cols.qty, amount: left + descWidth + cols.qty + cols.unit };
  const rule = (y: number, color = RULE) => doc.moveTo(left, y).lineTo(left + width, y).lineWidth(0.75).strokeColor(color).stroke();

  doc.moveDown(1.5);
  let y = doc.y;
  doc.font("strong").fontSize(9).fillColor(MUTED);
  doc.text("Description", x.desc, y, { width: descWidth - 8 });
  doc.text("Quantity", x.qty, y, { width: cols.qty, align: "right" });
  doc.text("Unit price", x.unit, y, { width: cols.unit, align: "right" });
  doc.text("Amount", x.amount, y, { width: cols.amount, align: "right" });
  y = doc.y + 4;
  rule(y, INK);
  y += 6;

  for (const l of inv.lines) {
    doc.font("regular").fontSize(10).fillColor(INK);
    const h = doc.heightOfString(l.description, { width: descWidth - 8 });
    if (y + h > doc.page.height - doc.page.margins.bottom - 120) {
      doc.addPage();
      y = doc.page.margins.top;
    }
    doc.text(l.description, x.desc, y, { width: descWidth - 8 });
    doc.font("figures").fontSize(10);
    doc.text(l.quantity.toLocaleString("en-US"), x.qty, y, { width: cols.qty, align: "right" });
    doc.text(l.unitAmount === null ? "" : money(l.unitAmount), x.unit, y, { width: cols.unit, align: "right" });
    doc.text(money(l.amount), x.amount, y, { width: cols.amount, align: "right" });
    y += Math.max(h, doc.currentLineHeight()) + 6;
    rule(y - 3);
  }
  if (inv.lines.length === 0) {
    doc.font("regular").fontSize(10).fillColor(MUTED).text("No line items.", x.desc, y, { width });
    y = doc.y + 6;
  }

  y += 8;
  const sums: [string, number, boolean][] = [
    ["Total", inv.total, true],
    ["Amount paid", inv.amountPaid, false],
    ["Amount remaining", remaining(inv), true],
  ];
  for (const [label, cents, strong] of sums) {
    doc.font(strong ? "strong" : "regular").fontSize(10.5).fillColor(INK).text(label, x.unit - 60, y, { width: cols.qty + 60, align: "left" });
    doc.font("figures").fontSize(10.5).text(money(cents), x.amount, y, { width: cols.amount, align: "right" });
    y = doc.y + 4;
  }

  doc
    .font("regular")
    .fontSize(8.5)
    .fillColor(MUTED)
    .text(
      `Amounts in ${inv.currency.toUpperCase()}. Questions about this invoice: ask the people who look after billing for ${inv.org.name}, its owners and billing admins in the Paritas console.`,
      left,
      doc.page.height - doc.page.margins.bottom - 30,
      { width, lineBreak: true },
    );

  doc.end();
  return done;
}
