// Command-line front end of the engine (Node only). Every failure is one line on stderr and exit code 1.
import { readFile } from "node:fs/promises";
import { resolve } from "node:path";
import { computeSpectrum, parseDesign } from "../core/index.ts";
import { parseYieldStudy, runYield } from "../studies/index.ts";
import { runYieldWithWorkers } from "./pool.ts";

/** Where the CLI writes. */
export interface CliIo {
  out(text: string): void;
  err(text: string): void;
  /** Directory relative file arguments are resolved against. */
  cwd: string;
}

const USAGE =
  "usage: optics spectrum <design.json> [--from nm] [--to nm] [--step nm] [--angle deg]\n" +
  "       optics yield <study.json> [--workers N]\n" +
  "       optics bench";

/** A user error: printed as one line, exit code 1. */
class CliError extends Error {}

function parseFlags(
  args: string[],
  allowed: readonly string[],
): { positional: string[]; flags: Record<string, string> } {
  const positional: string[] = [];
  const flags: Record<string, string> = {};
  for (let i = 0; i < args.length; i++) {
    const a = args[i] as string;
    if (a.startsWith("--")) {
      const [name, inline] = a.slice(2).split("=", 2) as [string, string | undefined];
      if (!allowed.includes(name))
        throw new CliError(
          `unknown option --${name} (expected ${allowed.map((f) => `--${f}`).join(", ") || "none"})`,
        );
      const value = inline ?? args[++i];
      if (value === undefined) throw new CliError(`option --${name} needs a value`);
      flags[name] = value;
    } else positional.push(a);
  }
  return { positional, flags };
}

function numberFlag(flags: Record<string, string>, name: string, fallback: number): number {
  const raw = flags[name];
  if (raw === undefined) return fallback;
  const v = Number(raw);
  if (raw.trim() === "" || !Number.isFinite(v))
    throw new CliError(`--${name}: expected a number, got ${JSON.stringify(raw)}`);
  return v;
}

async function readJson(file: string | undefined, what: string, cwd: string): Promise<unknown> {
  if (!file) throw new CliError(`missing ${what} file argument`);
  const path = resolve(cwd, file);
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new CliError(
      code === "ENOENT"
        ? `${what} file not found: ${path}`
        : `cannot read ${what} file ${path}: ${code ?? String(error)}`,
    );
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    throw new CliError(`${what} file ${path} is not valid JSON: ${(error as Error).message.split("\n")[0]}`);
  }
}

async function spectrumCommand(args: string[], io: CliIo): Promise<void> {
  const { positional, flags } = parseFlags(args, ["from", "to", "step", "angle"]);
  const raw = await readJson(positional[0], "design", io.cwd);
  let design: ReturnType<typeof parseDesign>;
  try {
    design = parseDesign(raw);
  } catch (error) {
    if (error instanceof RangeError) throw new CliError(`design.${error.message}`);
    throw error;
  }
  const from = numberFlag(flags, "from", 380);
  const to = numberFlag(flags, "to", 780);
  const step = numberFlag(flags, "step", 1);
  const angle = numberFlag(flags, "angle", 0);
  if (!(from > 0)) throw new CliError(`--from: expected a wavelength > 0 nm, got ${from}`);
  if (!(to >= from)) throw new CliError(`--to: expected a wavelength ≥ --from (${from} nm), got ${to}`);
  if (!(step > 0)) throw new CliError(`--step: expected a step > 0 nm, got ${step}`);
  if ((to - from) / step > 100000)
    throw new CliError(`--step: ${step} nm gives more than 100001 wavelengths`);
  if (!(angle >= 0 && angle < 90))
    throw new CliError(`--angle: expected 0 ≤ angle < 90 degrees, got ${angle}`);
  const wavelengths: number[] = [];
  const n = Math.floor((to - from) / step + 1e-9);
  for (let k = 0; k <= n; k++) wavelengths.push(from + k * step);
  const spectrum = computeSpectrum(design, { wavelengths, angleDeg: angle });
  io.out(JSON.stringify(toPlain(spectrum)));
}

/** Typed arrays to number[] so that JSON.stringify writes arrays. */
function toPlain(value: unknown): unknown {
  if (ArrayBuffer.isView(value) && !(value instanceof DataView))
    return Array.from(value as unknown as ArrayLike<number>);
  if (Array.isArray(value)) return value.map(toPlain);
  if (value && typeof value === "object")
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, toPlain(v)]));
  return value;
}

async function yieldCommand(args: string[], io: CliIo): Promise<void> {
  const { positional, flags } = parseFlags(args, ["workers"]);
  const study = parseYieldStudy(await readJson(positional[0], "study", io.cwd));
  const workers = numberFlag(flags, "workers", 1);
  if (!Number.isInteger(workers) || workers < 1 || workers > 64)
    throw new CliError(`--workers: expected an integer in 1..64, got ${flags.workers}`);
  const result = workers === 1 ? await runYield(study) : await runYieldWithWorkers(study, { workers });
  io.out(JSON.stringify(result));
}

async function benchCommand(io: CliIo): Promise<void> {
  // Loaded on demand: the benches are heavy and only this command needs them.
  const { runComparison } = await import("../../bench/compare.ts");
  io.out(await runComparison());
  const { runMonteCarloBench, formatMonteCarloBench } = await import("../../bench/montecarlo.ts");
  io.out(formatMonteCarloBench(await runMonteCarloBench()));
}

/** Run the CLI with `args` (without node and script); resolves to the exit code. */
export async function runCli(args: string[], io: CliIo): Promise<number> {
  const [command, ...rest] = args;
  try {
    switch (command) {
      case "spectrum":
        await spectrumCommand(rest, io);
        return 0;
      case "yield":
        await yieldCommand(rest, io);
        return 0;
      case "bench":
        await benchCommand(io);
        return 0;
      case undefined:
      case "help":
      case "--help":
        io.out(USAGE);
        return command === undefined ? 1 : 0;
      default:
        throw new CliError(`unknown command ${JSON.stringify(command)} (expected spectrum, yield or bench)`);
    }
  } catch (error) {
    if (error instanceof CliError || error instanceof RangeError) {
      io.err(`optics ${command ?? ""}: ${error.message.split("\n").join(" ")}`);
      return 1;
    }
    io.err(
      `optics ${command ?? ""}: unexpected failure: ${error instanceof Error ? error.message.split("\n")[0] : String(error)}`,
    );
    return 1;
  }
}
