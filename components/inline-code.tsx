/** Renders text in which `backticked` spans are code, as the API's help strings are written. */
export function InlineCode({ text }: { text: string }) {
  const parts = text.split(/`([^`]+)`/);
  return (
    <>
      {parts.map((part, i) =>
        i % 2 === 1 ? (
          <code key={i} className="pa-code">
            {part}
          </code>
        ) : (
          part
        ),
      )}
    </>
  );
}
