import type { ReactNode } from "react";

/** The problems of one checked row, each with its severity, row number and column. */
export function RowMessages({ rowLabel, messages }: { rowLabel: ReactNode; messages: { severity: "error" | "warning"; column: string | null; message: string }[] }) {
  return (
    <ul className="space-y-0.5 text-sm">
      {messages.map((m, i) => (
        <li key={i} className={m.severity === "error" ? "text-brick-700" : "text-clay-800"}>
          <strong>{m.severity === "error" ? "Error" : "Warning"}</strong>, {rowLabel}
          {m.column && (
            <>
              , column <span className="num">{m.column}</span>
            </>
          )}
          : {m.message}
        </li>
      ))}
    </ul>
  );
}

/**
 * Holds a row's messages in a cell spanning a table wider than the screen: pinned to the left edge of
 * the scrolling container and exactly as wide as its visible part, so the text wraps where it can be
 * read instead of running off the right. The scrolling container carries Tailwind's `@container`.
 */
export function MessageBlock({ children }: { children: ReactNode }) {
  return <div className="sticky left-0 w-[100cqw] px-3 pt-0.5 pb-2">{children}</div>;
}
