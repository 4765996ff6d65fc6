// A local SMTP sink: accepts every message on loopback, keeps it as an .eml file, and serves a small mailbox
// page (and JSON for tests) so a person can open what the product sent.
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { createServer, type Server } from "node:http";
import { join } from "node:path";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";
import { escapeHtml as escape } from "../../lib/html";

export interface SmtpSinkOptions {
  smtpPort: number;
  httpPort: number;
  dir: string;
}

export interface StoredMessage {
  id: string;
  from: string;
  to: string[];
  subject: string;
  date: string;
  text: string;
  html: string | null;
}


async function load(dir: string, id: string): Promise<StoredMessage> {
  const parsed = await simpleParser(readFileSync(join(dir, `${id}.eml`)));
  const to = Array.isArray(parsed.to) ? parsed.to : parsed.to ? [parsed.to] : [];
  return {
    id,
    from: parsed.from?.text ?? "",
    to: to.flatMap((a) => a.value.map((v) => v.address ?? "")),
    subject: parsed.subject ?? "",
    date: (parsed.date ?? new Date(0)).toISOString(),
    text: parsed.text ?? "",
    html: typeof parsed.html === "string" ? parsed.html : null,
  };
}

const listIds = (dir: string) =>
  readdirSync(dir)
    .filter((f) => f.endsWith(".eml"))
    .map((f) => f.slice(0, -4))
    .sort()
    .reverse();

export async function startSmtpSink(opts: SmtpSinkOptions): Promise<{ close: () => Promise<void> }> {
  mkdirSync(opts.dir, { recursive: true });
  let seq = 0;
  const smtp = new SMTPServer({
    authOptional: true,
    // The package's built-in certificate has expired; clients must talk plain SMTP to the sink.
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 25 * 1024 * 1024,
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", () => {
        const id = `${Date.now().toString().padStart(14, "0")}-${String(++seq).padStart(6, "0")}`;
        writeFileSync(join(opts.dir, `${id}.eml`), Buffer.concat(chunks));
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once("error", reject);
    smtp.listen(opts.smtpPort, "127.0.0.1", () => resolve());
  });

  const http: Server = createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", "http://127.0.0.1");
    try {
      if (url.pathname === "/messages.json") {
        const to = url.searchParams.get("to")?.toLowerCase();
        const all = await Promise.all(listIds(opts.dir).map((id) => load(opts.dir, id)));
        const body = to ? all.filter((m) => m.to.some((a) => a.toLowerCase() === to)) : all;
        res.writeHead(200, { "content-type": "application/json" });
        return res.end(JSON.stringify(body));
      }
      const m = /^\/messages\/([\w-]+)$/.exec(url.pathname);
      if (m) {
        const msg = await load(opts.dir, m[1]);
        res.writeHead(200, { "content-type": "text/html; charset=utf-8" });
        return res.end(
          page(
            escape(msg.subject),
            `<p><a href="/">&larr; all messages</a></p><h1>${escape(msg.subject)}</h1>
<dl><dt>From</dt><dd>${escape(msg.from)}</dd><dt>To</dt><dd>${escape(msg.to.join(", "))}</dd><dt>Date</dt><dd>${escape(msg.date)}</dd></dl>
<pre>${linkify(escape(msg.text))}</pre>`,
          ),
        );
      }
      if (url.pathname === "/") {
        const rows = await Promise.all(listIds(opts.dir).map((id) => load(opts.dir, id)));
        res.writeHead(200, { "content-type": "text/html; charset=utf-8" });
        return res.end(
          page(
            "Local mailbox",
            `<h1>Local mailbox</h1><p>Every message the local Sumfold sent. Files: <code>${escape(opts.dir)}</code></p>
<table><thead><tr><th>When</th><th>To</th><th>Subject</th></tr></thead><tbody>
${rows.map((r) => `<tr><td>${escape(r.date)}</td><td>${escape(r.to.join(", "))}</td><td><a href="/messages/${r.id}">${escape(r.subject || "(no subject)")}</a></td></tr>`).join("\n") || '<tr><td colspan="3">No messages yet.</td></tr>'}
</tbody></table>`,
          ),
        );
      }
      res.writeHead(404, { "content-type": "text/plain" });
      res.end("not found");
    } catch (e) {
      res.writeHead(500, { "content-type": "text/plain" });
      res.end(String((e as Error).message));
    }
  });
  await new Promise<void>((resolve, reject) => {
    http.once("error", reject);
    http.listen(opts.httpPort, "127.0.0.1", () => resolve());
  });

  return {
    close: async () => {
      await new Promise<void>((r) => smtp.close(() => r()));
      await new Promise<void>((r) => http.close(() => r()));
    },
  };
}

const linkify = (s: string) => s.replace(/(https?:\/\/[^\s<]+)/g, '<a href="$1">$1</a>');

const page = (title: string, body: string) => `<!doctype html><html lang="en"><head><meta charset="utf-8">
<title>${title}</title><style>body{font:15px/1.5 system-ui,sans-serif;max-width:60rem;margin:2rem auto;padding:0 1rem;color:#1c2430}
table{border-collapse:collapse;width:100%}td,th{border-bottom:1px solid #d8dee6;padding:.4rem;text-align:left}
pre{white-space:pre-wrap;background:#f4f6f8;padding:1rem}dt{font-weight:600}</style></head><body>${body}</body></html>`;
