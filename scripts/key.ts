// Operator CLI for API keys.
//   npm run key -- create --org <slug> --label <text> [--scopes cf,distribution] [--expires 2027-01-31T00:00:00Z]
//   npm run key -- list --org <slug>
//   npm run key -- revoke --org <slug> --prefix <sfk_...>
// `create` prints the new secret alone on stdout's first line (shown once); everything else goes to stderr.
// Without DATABASE_URL it talks to the demo database of `npm start` (which must be running).
import { parseArgs } from "node:util";
import { demoLayout, loadOrCreateSecrets } from "./lib/config";
import { databaseUrl } from "./lib/mariadb";

if (!process.env.DATABASE_URL) {
  const secrets = loadOrCreateSecrets();
  process.env.DATABASE_URL = databaseUrl(demoLayout(secrets).db);
  process.env.SUMFOLD_KEY_PEPPER ??= secrets.SUMFOLD_KEY_PEPPER;
}

const { ALL_SCOPES, isScope } = await import("../lib/api/scopes");
const { keyState } = await import("../lib/api/key-state");
const keys = await import("../lib/db/keys");
const { getPool } = await import("../lib/db/client");

const [command, ...rest] = process.argv.slice(2);
const { values } = parseArgs({
  args: rest,
  options: {
    org: { type: "string" },
    label: { type: "string" },
    scopes: { type: "string" },
    expires: { type: "string" },
    prefix: { type: "string" },
  },
});

function fail(message: string): never {
  console.error(`key: ${message}`);
  process.exit(2);
}

try {
  if (!values.org) fail("--org <slug> is required");
  const org = await keys.getOrgBySlug({ slug: values.org });
  if (!org) fail(`no organisation with slug "${values.org}"`);
  switch (command) {
    case "create": {
      if (!values.label) fail("--label <text> is required");
      const scopes = values.scopes ? values.scopes.split(",").map((s) => s.trim()) : ALL_SCOPES;
      const bad = scopes.filter((s) => !isScope(s));
      if (bad.length) fail(`unknown scope(s) ${bad.join(", ")}; choose from ${ALL_SCOPES.join(", ")}`);
      const expiresAt = values.expires ? new Date(values.expires) : null;
      if (expiresAt && Number.isNaN(expiresAt.getTime())) fail(`--expires "${values.expires}" is not a date`);
      const { key, secret } = await keys.createKey({
        organizationId: org.id,
        createdBy: null,
        label: values.label,
        scopes: scopes.filter(isScope),
        expiresAt,
        actor: { type: "system" },
      });
      process.stdout.write(`${secret}\n`);
      console.error(`created key ${key.prefix} "${key.label}" for ${org.slug}; the secret above is shown once`);
      break;
    }
    case "list": {
      const rows = await keys.listKeysByOrg({ organizationId: org.id });
      for (const { key } of rows) {
        console.log(
          [key.prefix, keyState(key), key.label, key.createdAt.toISOString(), key.lastUsedAt?.toISOString() ?? "never used"].join("\t"),
        );
      }
      break;
    }
    case "revoke": {
      if (!values.prefix) fail("--prefix <sfk_...> is required");
      const rows = await keys.listKeysByOrg({ organizationId: org.id });
      const hit = rows.find((r) => r.key.prefix === values.prefix);
      if (!hit) fail(`no key ${values.prefix} in ${org.slug}`);
      const done = await keys.revokeKey({ organizationId: org.id, keyId: hit.key.id, actor: { type: "system" } });
      console.error(done ? `revoked ${values.prefix}` : `${values.prefix} was already revoked`);
      break;
    }
    default:
      fail(`unknown command "${command ?? ""}"; use create, list or revoke`);
  }
} finally {
  await getPool().end();
}
