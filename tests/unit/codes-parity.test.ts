import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parity } from "@/lib/core/codes/parity";
import { InputError } from "@/lib/core/errors";

const bits = (s: string) => Uint8Array.from(s, Number);
const weight = (w: Uint8Array) => w.reduce((a, b) => a + b, 0);

function expectInputError(f: () => unknown, message: RegExp, path: (string | number)[]) {
  expect(f).toThrow(InputError);
  expect(f).toThrow(message);
  try {
    f();
  } catch (e) {
    expect((e as InputError).path).toEqual(path);
  }
}

const setup = fc.integer({ min: 2, max: 40 }).chain((n) =>
  fc.record({
    n: fc.constant(n),
    kind: fc.constantFrom("even" as const, "odd" as const),
    message: fc.uint8Array({ minLength: n - 1, maxLength: n - 1, min: 0, max: 1 }),
    error: fc.uint8Array({ minLength: n, maxLength: n, min: 0, max: 1 }),
    erasure: fc.integer({ min: 0, max: n - 1 }),
  }),
);

describe("single parity check (n, n − 1)", () => {
  it("appends one bit making the weight even or odd (by hand; MacWilliams & Sloane, ch. 1)", () => {
    expect(parity(5).encode(bits("1011"))).toEqual(bits("10111"));
    expect(parity(5, "odd").encode(bits("1011"))).toEqual(bits("10110"));
    expect(parity(4).generatorRows!()).toEqual([bits("1001"), bits("0101"), bits("0011")]);
    // The odd kind is a coset, not a linear code: no generator matrix.
    expect(parity(4, "odd").generatorRows).toBeUndefined();
    expect(parity(4)).toMatchObject({ n: 4, k: 3, dmin: 2, supportsErasures: true });
  });

  it("property: every codeword has zero syndrome; an error pattern is detected exactly when its weight is odd", () => {
    fc.assert(
      fc.property(setup, ({ n, kind, message, error }) => {
        const c = parity(n, kind);
        const cw = c.encode(message) as Uint8Array;
        expect(Array.from(c.decode(cw).syndrome)).toEqual([0]);
        const d = c.decode(cw.map((b, i) => b ^ error[i]!));
        expect(d.failure).toBe(weight(error) % 2 === 1);
        expect(d.correctedPositions).toEqual([]);
        if (d.failure) expect(d.reason).toMatch(/odd number of bits are in error/);
        else expect(d.message).toEqual(weight(error) === 0 ? message : cw.map((b, i) => b ^ error[i]!).slice(0, n - 1));
      }),
    );
  });

  it("property: one erasure is filled from the parity, whatever the received bit there", () => {
    fc.assert(
      fc.property(setup, ({ n, kind, message, erasure }) => {
        const c = parity(n, kind);
        const r = (c.encode(message) as Uint8Array).slice();
        r[erasure]! ^= 1;
        const d = c.decode(r, [erasure]);
        expect(d.failure).toBe(false);
        expect(d.message).toEqual(message);
        expect(d.correctedPositions).toEqual([erasure]);
      }),
    );
  });

  it("two erasures cannot be filled: failure, nothing changed", () => {
    const d = parity(4).decode(bits("1001"), [0, 2]);
    expect(d).toMatchObject({ failure: true, correctedPositions: [], codeword: bits("1001") });
    expect(d.reason).toMatch(/2 erasures; a single parity check can fill only one/);
  });

  it("input errors name the field", () => {
    expectInputError(() => parity(1), /n must be an integer from 2/, ["n"]);
    expectInputError(() => parity(4, "none" as "even"), /kind must be "even" or "odd"/, ["kind"]);
    const c = parity(4);
    expectInputError(() => c.encode(bits("1010")), /message has 4 bits; even parity \(4,3\) takes 3/, ["message"]);
    expectInputError(() => c.decode(bits("10a1".replace("a", "2"))), /received bit 2 is 2/, ["received", 2]);
    expectInputError(() => c.decode(bits("1001"), [4]), /erasure 0 is 4; positions are integers from 0 to 3/, ["erasures", 0]);
    expectInputError(() => c.decode(bits("1001"), [1, 1]), /erasure 1 repeats position 1/, ["erasures", 1]);
  });
});
