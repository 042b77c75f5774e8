/** Class strings shared by the console's controls: one look for every button, input and panel. */

const btn =
  "inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-2 text-sm font-medium whitespace-nowrap no-underline transition-[filter,background-color] disabled:cursor-not-allowed disabled:opacity-60";

export const buttonPrimary = `${btn} bg-accent text-accent-ink shadow-sm hover:brightness-110`;
export const buttonSecondary = `${btn} border border-ink-2/50 bg-surface text-ink hover:bg-sunken`;
export const buttonQuiet = `${btn} text-ink-2 hover:bg-sunken hover:text-ink`;
/** A quiet button for a destructive action (Remove, Revoke) inside a list. */
export const buttonQuietDanger = `${btn} text-[#a3261c] hover:bg-[#f7e1dd] dark:text-[#f5a196] dark:hover:bg-[#3a1714]`;
/** Destructive: a brick red of our own, AA on white text in light and on dark text in dark mode. */
export const buttonDanger = `${btn} bg-[#a3261c] text-white shadow-sm hover:brightness-110 dark:bg-[#f08a7e] dark:text-[#1b0b08]`;
export const buttonSmall = "px-2.5 py-1 text-[0.8125rem]";

export const dangerText = "text-[#a3261c] dark:text-[#f5a196]";

export const inputBase =
  "block w-full rounded-md border border-ink-2/60 bg-surface px-3 py-2 text-sm text-ink placeholder:text-ink-2/80 aria-[invalid=true]:border-[#a3261c] dark:aria-[invalid=true]:border-[#f08a7e] disabled:opacity-60";
export const selectBase = `${inputBase} pr-8`;
export const labelBase = "block text-sm font-medium text-ink";
export const hintBase = "mt-1 text-xs text-ink-2";
export const errorText = `mt-1 text-xs font-medium ${dangerText}`;

export const panel = "rounded-lg border border-rule bg-surface";
export const tableHead = "bg-sunken text-left text-xs font-medium tracking-wide text-ink-2 uppercase";

/*
 * A table that turns into a stack of cards below the md breakpoint (phones): each row a card,
 * each cell on its own line under its column's name, taken from the cell's data-label. The
 * header row stays for screen readers only.
 */
export const stackTable = "max-md:block";
export const stackHead = "max-md:sr-only";
export const stackBody = "max-md:block";
export const stackRow = "max-md:block max-md:px-1 max-md:py-2";
export const stackCell =
  "max-md:block max-md:py-1 max-md:before:block max-md:before:text-xs max-md:before:font-medium max-md:before:tracking-wide max-md:before:text-ink-2 max-md:before:uppercase max-md:before:content-[attr(data-label)]";
