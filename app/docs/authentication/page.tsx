import type { Metadata } from "next";
import { SCOPES } from "@/lib/api/scopes";
import { Code, Prose } from "../_components/prose";

export const metadata: Metadata = { title: "Authentication" };

export default function AuthenticationGuide() {
  return (
    <Prose>
      <h1>Authentication</h1>
      <p>
        Every call except <code>GET /api/v1/health</code> and <code>GET /api/v1/openapi.json</code> needs an API key in the{" "}
        <code>Authorization</code> header:
      </p>
      <Code>{`Authorization: Bearer sfk_<public id>_<secret and checksum>`}</Code>
      <p>
        Keys start with <code>sfk_</code>, then a ten-character public id (shown in the portal as the key&rsquo;s prefix), then 130
        bits of secret and a six-character checksum. A key with a typo or a missing character fails its checksum and is refused at
        once with <code>401</code>. We store only a keyed hash of each key: the portal shows the secret exactly once, when the key
        is created or rotated. Keep it in a secret store, never in a browser or a repository.
      </p>
      <h2>Scopes</h2>
      <p>Each key carries the endpoint groups it may call. A call outside them answers <code>403</code>.</p>
      <table>
        <thead>
          <tr>
            <th>scope</th>
            <th>grants</th>
          </tr>
        </thead>
        <tbody>
          {Object.entries(SCOPES).map(([k, v]) => (
            <tr key={k}>
              <td>
                <code>{k}</code>
              </td>
              <td>{v}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h2>Rotation and revocation</h2>
      <p>
        Rotating a key issues a new secret and lets the old one keep working for the grace period you choose (immediately, one hour,
        a day or a week), so you can roll the new key out without downtime. Revoking stops a key everywhere within one second.
        Expired, revoked and retired keys answer <code>401</code>.
      </p>
      <h2>Cross-origin calls</h2>
      <p>
        The API answers CORS preflights from any origin, because it uses bearer keys and no cookies. Do not ship a key to a browser
        you do not control: call Sumfold from your server.
      </p>
    </Prose>
  );
}
