"use client";

import { useId } from "react";
import { inputClass } from "../../_components/ui";
import type { FieldIssue } from "./run";

/** The model as JSON, with the issues the API found listed under it by JSON pointer. */
export function ModelEditor({ text, onChange, issues }: { text: string; onChange: (t: string) => void; issues: FieldIssue[] }) {
  const id = useId();
  const issuesId = `${id}-issues`;
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-semibold">
        Model (JSON)
      </label>
      <textarea
        id={id}
        className={`${inputClass} h-72 font-mono text-sm`}
        spellCheck={false}
        value={text}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={issues.length ? true : undefined}
        aria-describedby={issues.length ? issuesId : undefined}
      />
      {issues.length ? (
        <ul id={issuesId} className="mt-2 space-y-1 text-sm text-red-700" data-testid="model-issues">
          {issues.map((i, k) => (
            <li key={k}>
              {i.pointer ? <code className="mr-1 rounded bg-red-50 px-1 font-mono text-xs">{i.pointer}</code> : null}
              {i.detail}
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
