import { describe, expect, it } from "vitest";
import { cachedAt } from "@/lib/cache/data-version";

describe("cachedAt", () => {
  it("computes once per key and version, again when the version changes", async () => {
    let calls = 0;
    const compute = async () => ++calls;
    expect(await cachedAt("k-test", "v1", compute)).toBe(1);
    expect(await cachedAt("k-test", "v1", compute)).toBe(1);
    expect(await cachedAt("k-test", "v2", compute)).toBe(2);
    expect(calls).toBe(2);
  });

  it("shares one computation between concurrent callers", async () => {
    let calls = 0;
    const compute = () => new Promise<number>((r) => setTimeout(() => r(++calls), 10));
    const [a, b] = await Promise.all([cachedAt("k-shared", "v", compute), cachedAt("k-shared", "v", compute)]);
    expect([a, b, calls]).toEqual([1, 1, 1]);
  });

  it("does not keep a failure", async () => {
    let calls = 0;
    const failing = async () => {
      calls++;
      throw new Error("down");
    };
    await expect(cachedAt("k-fail", "v", failing)).rejects.toThrow("down");
    await expect(cachedAt("k-fail", "v", failing)).rejects.toThrow("down");
    expect(calls).toBe(2);
  });
});
