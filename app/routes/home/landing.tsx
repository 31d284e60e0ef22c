export default function Landing() {
  return (
    <main className="mx-auto max-w-3xl p-8">
      <h1 className="text-3xl font-semibold">Rakeline</h1>
      <p className="mt-2 text-ink-soft">Aero balance and understeer from your logger, stint by stint.</p>
    </main>
  );
}
