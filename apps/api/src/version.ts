import pkg from "../package.json" with { type: "json" };

export const API_VERSION: string = pkg.version;
