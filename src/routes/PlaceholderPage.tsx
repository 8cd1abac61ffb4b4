export function PlaceholderPage({ title }: { title: string }) {
  return (
    <section>
      <h1 className="page-title">{title}</h1>
      <p className="mt-2 text-ink-soft">Coming soon.</p>
    </section>
  );
}
