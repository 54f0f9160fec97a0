import { Field, Input } from "@/components/ui/input";

/** New password twice, with the shared rule as hint and per-field errors. */
export function NewPasswordFields({ errors }: { errors?: Record<string, string> }) {
  const e = errors ?? {};
  return (
    <>
      <Field label="New password" htmlFor="password" error={e.password} hint="At least 10 characters.">
        <Input
          id="password"
          name="password"
          type="password"
          autoComplete="new-password"
          required
          minLength={10}
          aria-invalid={!!e.password}
          aria-describedby={e.password ? "password-error" : "password-hint"}
        />
      </Field>
      <Field label="New password again" htmlFor="confirm" error={e.confirm}>
        <Input id="confirm" name="confirm" type="password" autoComplete="new-password" required aria-invalid={!!e.confirm} aria-describedby={e.confirm ? "confirm-error" : undefined} />
      </Field>
    </>
  );
}
