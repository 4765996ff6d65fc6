import { execFileSync, spawnSync } from "node:child_process";

/** True when `cmd` is found on PATH (or at an absolute path). */
export function hasCommand(cmd: string): boolean {
  return spawnSync("sh", ["-c", `command -v ${cmd}`], { stdio: "ignore" }).status === 0;
}

let updated = false;

/**
 * Installs Debian packages whose probe command is missing. Runs apt-get as root, or through sudo when not.
 * `wanted` maps a package name to the command that shows it is installed.
 */
export function ensureDebianPackages(wanted: Record<string, string>, log: (m: string) => void): void {
  const missing = Object.entries(wanted)
    .filter(([, probe]) => !hasCommand(probe))
    .map(([pkg]) => pkg);
  if (missing.length === 0) return;
  const asRoot = process.getuid?.() === 0;
  const run = (args: string[]) => {
    const [cmd, argv] = asRoot ? ["apt-get", args] : ["sudo", ["-n", "apt-get", ...args]];
    execFileSync(cmd, argv as string[], {
      stdio: "inherit",
      env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
    });
  };
  log(`installing Debian packages: ${missing.join(", ")}`);
  if (!updated) {
    run(["update", "-qq"]);
    updated = true;
  }
  run(["install", "-y", "-qq", "--no-install-recommends", ...missing]);
}
