/** Shown while a page reads its data. */
export default function Loading() {
  return (
    <p className="loading" role="status">
      Reading the latest data for this page…
    </p>
  );
}
