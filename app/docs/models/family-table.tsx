import { catalogueResponse } from "@/lib/api/catalogue";

export function FamilyTable() {
  const { families } = catalogueResponse();
  return (
    <div className="overflow-x-auto">
    <table className="min-w-[36rem]">
      <thead>
        <tr>
          <th>family</th>
          <th>parameters</th>
          <th>characteristic function</th>
          <th>moments</th>
          <th>tail index</th>
        </tr>
      </thead>
      <tbody>
        {families.map((f) => (
          <tr key={f.family} id={`family-${f.family}`}>
            <td>
              <code>{f.family}</code>
              <div className="text-xs text-ink-faint">{f.title}</div>
            </td>
            <td className="text-xs">
              {f.parameters.map((p) => (
                <div key={p.name}>
                  <code>{p.name}</code> {p.range}
                  {"default" in p ? ` (default ${p.default})` : ""}
                </div>
              ))}
            </td>
            <td className="font-mono text-xs">{f.cf}</td>
            <td className="text-xs">{f.moments}</td>
            <td className="text-xs">
              {f.tailIndex}
              <div className="text-ink-faint">{f.source}</div>
            </td>
          </tr>
        ))}
      </tbody>
    </table>
    </div>
  );
}
