export default function Loading() {
  return (
    <p role="status" aria-live="polite" className="text-peat-700">
      Loading…
    </p>
  );
}
