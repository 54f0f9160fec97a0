export default function Loading() {
  return (
    <p role="status" className="text-muted">
      Loading sites and saved estimates…
    </p>
  );
}
