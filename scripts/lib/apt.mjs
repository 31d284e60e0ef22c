// Debian packages the lifecycle needs (mariadb-server, chromium), installed with apt-get when missing.
import { existsSync, writeFileSync, chmodSync } from "node:fs";
import { banner, findExecutable, info, run, UserFacingError } from "./proc.mjs";

const POLICY_RC = "/usr/sbin/policy-rc.d";

/**
 * needs: [{ pkg: "mariadb-server", present: () => boolean }]. Installs the missing ones in one apt run.
 * Package post-install scripts must not start system services: policy-rc.d exiting 101 forbids it.
 */
export async function ensureDebianPackages(needs) {
  const missing = needs.filter((need) => !need.present());
  if (missing.length === 0) return;
  const names = missing.map((need) => need.pkg);
  banner(`apt-get install ${names.join(" ")}`);
  const why = `Rakeline needs the Debian package(s) ${names.join(", ")}`;
  if (process.platform !== "linux" || !findExecutable("apt-get")) {
    throw new UserFacingError(`${why}, and this machine has no apt-get. Install them yourself and run again.`);
  }
  if (typeof process.getuid === "function" && process.getuid() !== 0) {
    throw new UserFacingError(
      `${why}, and installing them needs root. Run as root, or install them first: sudo apt-get install -y ${names.join(" ")}`,
    );
  }
  if (!existsSync(POLICY_RC)) {
    writeFileSync(POLICY_RC, "#!/bin/sh\n# Written by Rakeline's scripts: packages must not start services here.\nexit 101\n");
    chmodSync(POLICY_RC, 0o755);
    info(`wrote ${POLICY_RC} (exit 101) so package installs start no services`);
  }
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  const lockWait = ["-o", "DPkg::Lock::Timeout=300"];
  // The package lists may be empty or stale on a fresh machine.
  const update = await run("apt-get", [...lockWait, "update"], { env });
  if (update.code !== 0) throw new UserFacingError(`apt-get update failed (exit ${update.code}); see above`);
  const install = await run("apt-get", [...lockWait, "install", "-y", ...names], { env });
  if (install.code !== 0) {
    throw new UserFacingError(`apt-get install ${names.join(" ")} failed (exit ${install.code}); see the apt output above`);
  }
  const stillMissing = missing.filter((need) => !need.present()).map((need) => need.pkg);
  if (stillMissing.length) throw new UserFacingError(`apt-get finished but ${stillMissing.join(", ")} is still not usable`);
}

export const mariadbPackage = { pkg: "mariadb-server", present: () => Boolean(findExecutable("mariadbd")) };
export const chromiumPackage = { pkg: "chromium", present: () => existsSync("/usr/bin/chromium") };
