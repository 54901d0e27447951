export function DisplayRevoked() {
  return (
    <div className="mx-auto max-w-xl space-y-3 p-8" data-testid="display-revoked">
      <h1 className="text-2xl font-semibold">This display link has been revoked</h1>
      <p className="text-muted">An administrator has withdrawn this wall screen&apos;s access. Ask them for a new display link.</p>
    </div>
  );
}
