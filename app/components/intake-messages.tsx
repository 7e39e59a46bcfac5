/** The problems of one checked row, each with its severity, row number and column. */
export function RowMessages({ rowLabel, messages }: { rowLabel: string; messages: { severity: "error" | "warning"; column: string | null; message: string }[] }) {
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
