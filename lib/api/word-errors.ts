import { InputError } from "@/lib/core/errors";
import { toPointer, validationProblem, type FieldError } from "./errors";

/**
 * The bad words of a batch, found while its checks run so that one answer names all of them, not only the
 * first. Each word keeps its first error (a word that failed one check skips the later ones); the answer
 * lists them in word order, the first MAX_FIELD_ERRORS of them, and counts the rest. An error belongs to word
 * i when it points at `field`/i/… or at a per-word companion list such as `erasures`/i/…; any other error
 * (the code spec's, a limit) is the request's and propagates at once. One slot per word: O(words) in all.
 */
export class WordErrors {
  private readonly bad: (FieldError | undefined)[];
  private count = 0;

  constructor(
    readonly field: string,
    size: number,
    private readonly companions: readonly string[] = [],
  ) {
    this.bad = new Array<FieldError | undefined>(size);
  }

  /** Some word has failed a check. */
  get any(): boolean {
    return this.count > 0;
  }

  /** Run check `fn` of word `i`, unless the word already failed: its own InputError is recorded and the result is undefined. */
  check<T>(i: number, fn: () => T): T | undefined {
    if (this.bad[i]) return undefined;
    try {
      return fn();
    } catch (e) {
      if (!(e instanceof InputError) || e.path[1] !== i || !(e.path[0] === this.field || this.companions.includes(String(e.path[0])))) throw e;
      this.bad[i] = { pointer: toPointer(e.path), message: e.message };
      this.count++;
      return undefined;
    }
  }

  /** Run `fn` on each item whose word has not failed (undefined items are skipped), collecting errors as `check` does. */
  each<S, T>(items: readonly (S | undefined)[], fn: (item: S, i: number) => T): (T | undefined)[] {
    return items.map((item, i) => (item === undefined ? undefined : this.check(i, () => fn(item, i))));
  }

  /** The items, once every word passed; otherwise the validation problem listing the bad words. */
  settle<T>(items: readonly (T | undefined)[]): T[] {
    if (this.count === 0) return items as T[];
    const errors = this.bad.filter((e): e is FieldError => e !== undefined);
    const words = this.bad.length;
    throw validationProblem(errors, `${this.count} of the ${words} ${this.field} are invalid (positions count from 0)`);
  }
}
