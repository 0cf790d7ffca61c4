// Build native addons (better-sqlite3) against the headers of the Node.js that runs the install:
// its prebuilt download is unreachable here and pnpm 12 does not pass `nodedir` from .npmrc on.
const path = require("node:path");
const fs = require("node:fs");

function nodeDir() {
  const prefix = path.resolve(path.dirname(process.execPath), "..");
  return fs.existsSync(path.join(prefix, "include", "node", "node_version.h")) ? prefix : undefined;
}

module.exports = {
  hooks: {
    updateConfig(config) {
      const dir = nodeDir();
      if (dir) {
        config.extraEnv = { ...(config.extraEnv ?? {}), npm_config_nodedir: dir };
      }
      return config;
    },
  },
};
