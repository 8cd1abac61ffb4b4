export function HomePage() {
  return (
    <section>
      <h1 className="page-title">Tidegauge</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">
        Split economic series into trend and cycle, keep every release as a vintage, watch estimates being revised, and take the
        charts that go into published reports through review.
      </p>
    </section>
  );
}
