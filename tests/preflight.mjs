// Run first by `npm test`: the browser and broker tests need two Debian packages; say so once instead of failing many tests.
import fs from "node:fs";
import path from "node:path";

// PREFLIGHT_ROOT: where to look for them (a test points it at an empty folder).
const root = process.env.PREFLIGHT_ROOT ?? "/";

const needed = [
  ["/usr/bin/chromium", "chromium"],
  ["/usr/sbin/mosquitto", "mosquitto"],
  ["/usr/bin/mosquitto_passwd", "mosquitto"],
];
const missing = [...new Set(needed.filter(([file]) => !isExecutable(path.join(root, file))).map(([, pkg]) => pkg))];

function isExecutable(file) {
  try {
    fs.accessSync(file, fs.constants.X_OK);
    return true;
  } catch {
    return false;
  }
}

if (missing.length > 0) {
  console.error(
    `npm test needs Debian's ${missing.join(" and ")}: install with \`apt-get install -y ${missing.join(" ")}\` (or run \`bash .ci/run\`, which installs them and then runs the tests).`,
  );
  process.exit(1);
}
