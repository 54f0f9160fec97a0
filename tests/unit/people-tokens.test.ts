import { describe, expect, it } from "vitest";
import { csvField } from "@/lib/people/audit-log";
import { rowProblem } from "@/lib/people/links";
import { checkToken, hashToken, issueToken } from "@/lib/people/tokens";
import { timeZoneAt } from "@/lib/geo/time-zone";

const SECRET = "unit-test-secret-0123456789";

describe("link tokens", () => {
  it("a fresh token checks out for its purpose and is stored only as its SHA-256", () => {
    const { token, hash } = issueToken(SECRET, "invite");
    expect(checkToken(SECRET, "invite", token)).toBe("ok");
    expect(hash).toBe(hashToken(token));
    expect(hash).toMatch(/^[0-9a-f]{64}$/);
    expect(hash).not.toContain(token.slice(0, 10));
  });

  it("any change to any character is refused (including the spare bits of the last one)", () => {
    const { token } = issueToken(SECRET, "email");
    for (let i = 0; i < token.length; i++) {
      if (token[i] === ".") continue;
      for (const c of ["A", "B", "_"]) {
        if (token[i] === c) continue;
        const t = token.slice(0, i) + c + token.slice(i + 1);
        expect(checkToken(SECRET, "email", t), `position ${i} → ${c}`).toBe("tampered");
      }
    }
  });

  it("two tokens are never the same", () => {
    const seen = new Set(Array.from({ length: 200 }, () => issueToken(SECRET, "reset").token));
    expect(seen.size).toBe(200);
  });

  it("refuses altered tokens, tokens for another purpose or signed with another secret, and junk", () => {
    const { token } = issueToken(SECRET, "reset");
    const flipped = (token[0] === "A" ? "B" : "A") + token.slice(1);
    expect(checkToken(SECRET, "reset", flipped)).toBe("tampered");
    expect(checkToken(SECRET, "reset", token.slice(0, -1) + (token.at(-1) === "A" ? "B" : "A"))).toBe("tampered");
    expect(checkToken(SECRET, "invite", token)).toBe("tampered");
    expect(checkToken("another-secret-0123456789", "reset", token)).toBe("tampered");
    expect(checkToken(SECRET, "reset", "")).toBe("malformed");
    expect(checkToken(SECRET, "reset", token + "x")).toBe("malformed");
    expect(checkToken(SECRET, "reset", "not-a-token")).toBe("malformed");
  });

  it("stored rows: unknown or revoked → invalid; used → used; past expiry → expired", () => {
    const now = new Date("2026-06-01T00:00:00Z");
    const later = new Date("2026-06-02T00:00:00Z");
    expect(rowProblem(undefined, now)).toBe("invalid");
    expect(rowProblem({ usedAt: null, expiresAt: later, revokedAt: now }, now)).toBe("invalid");
    expect(rowProblem({ usedAt: now, expiresAt: later }, now)).toBe("used");
    expect(rowProblem({ usedAt: null, expiresAt: now }, now)).toBe("expired");
    expect(rowProblem({ usedAt: null, expiresAt: later }, now)).toBeNull();
  });
});

describe("audit CSV fields (RFC 4180)", () => {
  it("quotes commas, quotes and line breaks; JSON objects are quoted JSON", () => {
    expect(csvField("plain")).toBe("plain");
    expect(csvField("a,b")).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField("two\nlines")).toBe('"two\nlines"');
    expect(csvField({ role: "admin" })).toBe('"{""role"":""admin""}"');
    expect(csvField(null)).toBe("");
    expect(csvField(new Date("2026-01-02T03:04:05Z"))).toBe("2026-01-02T03:04:05.000Z");
  });
  it("defuses spreadsheet formulas", () => {
    expect(csvField("=HYPERLINK(1)")).toBe("'=HYPERLINK(1)");
    expect(csvField("@SUM(A1)")).toBe("'@SUM(A1)");
  });
});

describe("time zone from position (tz-lookup)", () => {
  it("finds the zones of known places", () => {
    expect(timeZoneAt(37.91, -111.42)).toBe("America/Denver"); // southern Utah
    expect(timeZoneAt(34.62, -111.78)).toBe("America/Phoenix"); // Arizona keeps standard time
    expect(timeZoneAt(51.48, 0)).toBe("Europe/London"); // Greenwich
    expect(timeZoneAt(95, 0)).toBeNull();
  });
});
