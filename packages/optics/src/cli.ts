// Entry point of `pnpm optics <command>`. File arguments are relative to where pnpm was invoked (INIT_CWD).
import { runCli } from "./cli/main.ts";

const code = await runCli(process.argv.slice(2), {
  out: (text) => process.stdout.write(`${text}\n`),
  err: (text) => process.stderr.write(`${text}\n`),
  cwd: process.env.INIT_CWD ?? process.cwd(),
});
process.exitCode = code;
