/** Argument checks shared by the pure domain modules: a clear RangeError naming the argument. */
export function requireFinite(name: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number (got ${String(value)})`);
  }
  return value;
}

export function requirePositive(name: string, value: unknown): number {
  const v = requireFinite(name, value);
  if (v <= 0) throw new RangeError(`${name} must be greater than zero (got ${v})`);
  return v;
}
