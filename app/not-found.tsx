import Link from "next/link";

export default function NotFound() {
  return (
    <section className="mx-auto max-w-page px-5 py-20">
      <h1 className="font-display text-3xl font-semibold">Nothing here</h1>
      <p className="mt-3 text-ink-soft">
        That page does not exist. <Link className="text-fold-600 underline" href="/">Back to the start</Link>.
      </p>
    </section>
  );
}
