export default function DisplayLinkUnknown() {
  return (
    <div className="mx-auto max-w-xl space-y-3 p-8" data-testid="display-unknown">
      <h1 className="text-2xl font-semibold">This display link is not valid</h1>
      <p className="text-muted">Check the address, or ask an administrator for a new display link.</p>
    </div>
  );
}
