export function NotBuilt({ title, what }: { title: string; what: string }) {
  return (
    <section className="max-w-2xl space-y-2">
      <h1 className="text-2xl font-semibold">{title}</h1>
      <p className="rounded border border-dashed border-line bg-raised p-4 text-muted" data-testid="not-built">
        Not built yet. {what}
      </p>
    </section>
  );
}
