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
      <p>
        Each key carries the endpoint groups it may call. A call outside them answers <code>403</code>. Every group is read-only
        computation, so a new key gets all of them unless you narrow it; you can change a key&rsquo;s label and groups later on the
        Keys page without a new secret.
      </p>
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
      <h2 id="address-ranges">Allowed address ranges</h2>
      <p>
        A key can be limited to client address ranges written in CIDR notation (<code>203.0.113.0/24</code>,{" "}
        <code>2001:db8::/48</code>, or a single address), up to 20 per key. A call from any other address answers <code>403</code>{" "}
        with the problem type <a href="/docs/errors#address_not_allowed">address_not_allowed</a>; its detail names the ranges and the
        address the server saw. Changes reach every server within one second. Without ranges a key works from anywhere.
      </p>
      <Code>{`HTTP/1.1 403 Forbidden
Content-Type: application/problem+json

{"type": ".../docs/errors#address_not_allowed", "title": "The key may not be used from this address", "status": 403,
 "detail": "This API key accepts calls only from 203.0.113.0/24; this call came from 198.51.100.7."}`}</Code>
      <h2>Rotation and revocation</h2>
      <p>
        Rotating a key issues a new secret and lets the old one keep working for the grace period you choose (immediately, one hour,
        a day or a week), so you can roll the new key out without downtime. Revoking stops a key everywhere within one second.
        Expired, revoked and retired keys answer <code>401</code>. When an admin removes a member, the keys that person created are
        revoked, unless the admin hands them to another member; the audit log records which.
      </p>
      <h2>Cross-origin calls</h2>
      <p>
        The API answers CORS preflights from any origin, because it uses bearer keys and no cookies. Do not ship a key to a browser
        you do not control: call Sumfold from your server.
      </p>
    </Prose>
  );
}
