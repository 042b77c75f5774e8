import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

const config = [
  ...nextVitals,
  ...nextTs,
  { ignores: [".next/**", "node_modules/**", "data/**", "public/vendor/**", "dist/**", "packages/*/dist/**", ".scratch-core/**", "next-env.d.ts", "tests/fixtures/**/*.py"] },
];

export default config;
