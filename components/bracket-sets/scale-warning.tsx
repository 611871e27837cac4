/** The kit's plate scale against the frames', with both numbers (lib/bracket-sets/scale-check.ts); nothing when they agree. */
export function ScaleWarning({ text }: { text: string | null }) {
  if (!text) return null;
  return (
    <p role="note" className="mb-8 max-w-3xl rounded-card border border-warn/60 bg-warn/10 p-4 text-sm">
      <strong className="block font-semibold">The kit and the frames do not agree on the plate scale.</strong>
      {text}
    </p>
  );
}
