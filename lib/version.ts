import pkg from "../package.json" with { type: "json" };

/** The engine version reported in every API response's meta. */
export const ENGINE_VERSION: string = pkg.version;
