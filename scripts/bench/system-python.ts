// Debian's Python for reference checks and the benchmark: /usr/bin/python3 with
// python3-opencv, python3-astropy and python3-numpy (the `python3` first on PATH
// may be another interpreter without them). A missing module is a clear error.
import { execFileSync } from "node:child_process";

export const SYSTEM_PYTHON = "/usr/bin/python3";

export function requirePythonModules(modules: string[]): void {
  for (const name of modules) {
    try {
      execFileSync(SYSTEM_PYTHON, ["-c", `import ${name}`], { stdio: "pipe" });
    } catch {
      const pkg = name === "cv2" ? "python3-opencv" : `python3-${name}`;
      throw new Error(`${SYSTEM_PYTHON} cannot import ${name}: the test command (npm test, through scripts/setup.sh) installs ${pkg} from Debian; or run: apt-get install -y ${pkg}`);
    }
  }
}

export function runSystemPython(script: string, args: string[], modules: string[]): string {
  requirePythonModules(modules);
  return execFileSync(SYSTEM_PYTHON, ["-c", script, ...args], { encoding: "utf8", maxBuffer: 64 << 20 });
}
