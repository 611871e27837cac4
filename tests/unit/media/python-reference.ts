// Runs a reference check in Debian's Python (/usr/bin/python3 with python3-astropy
// and friends; the `python3` first on PATH may be another interpreter). A missing
// module fails the test with a message that says how to get it.
import { execFileSync } from "node:child_process";

export const SYSTEM_PYTHON = "/usr/bin/python3";

export function runPython(script: string, args: string[] = [], modules: string[] = []): string {
  for (const pythonModule of modules) {
    try {
      execFileSync(SYSTEM_PYTHON, ["-c", `import ${pythonModule}`], { stdio: "pipe" });
    } catch {
      throw new Error(
        `${SYSTEM_PYTHON} cannot import ${pythonModule}: the test command (npm test, through scripts/setup.sh) installs python3-${pythonModule} from Debian; ` +
          `or run: apt-get install -y python3-${pythonModule}`,
      );
    }
  }
  return execFileSync(SYSTEM_PYTHON, ["-c", script, ...args], { encoding: "utf8", maxBuffer: 64 << 20 });
}
