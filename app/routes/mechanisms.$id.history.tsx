export default function Page() {
  return <p className="text-ink-600">This page is being built.</p>;
}
