import { spawn, type ChildProcess } from "node:child_process";

type Managed = { name: string; child: ChildProcess; oneShot: boolean };

const children: Managed[] = [];
let stopping = false;

function prefixLines(name: string, stream: NodeJS.ReadableStream | null, out: NodeJS.WriteStream) {
  if (!stream) return;
  let buffer = "";
  stream.setEncoding("utf8");
  stream.on("data", (chunk: string) => {
    buffer += chunk;
    const lines = buffer.split("\n");
    buffer = lines.pop() ?? "";
    for (const line of lines) out.write(`[${name}] ${line}\n`);
  });
}

function spawnManaged(name: string, command: string, args: string[], env: NodeJS.ProcessEnv, oneShot: boolean) {
  const child = spawn(command, args, { env, stdio: ["ignore", "pipe", "pipe"] });
  prefixLines(name, child.stdout, process.stdout);
  prefixLines(name, child.stderr, process.stderr);
  children.push({ name, child, oneShot });
  return child;
}

/** Starts a long-running child process with prefixed output; if it dies while we are not stopping, everything stops. */
export function startProcess(name: string, command: string, args: string[], env: NodeJS.ProcessEnv): ChildProcess {
  const child = spawnManaged(name, command, args, env, false);
  child.on("exit", (code, signal) => {
    if (stopping) return;
    console.error(`[airkeep] ${name} exited (${signal ?? code}); stopping the rest.`);
    void stopAll(1);
  });
  return child;
}

/** Runs a job that ends by itself (stopped with the rest on Ctrl-C); resolves with its exit code. */
export function runJob(name: string, command: string, args: string[], env: NodeJS.ProcessEnv): Promise<number> {
  const child = spawnManaged(name, command, args, env, true);
  return new Promise((resolve) => child.on("exit", (code) => resolve(code ?? 1)));
}

/** Runs a command to completion, inheriting the terminal. */
export function runToEnd(command: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { env, stdio: "inherit" });
    child.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`${command} ${args.join(" ")} exited with ${code}`))));
  });
}

export async function stopAll(exitCode = 0): Promise<never> {
  stopping = true;
  const alive = children.filter((c) => c.child.exitCode === null && c.child.signalCode === null);
  // Stop in reverse start order so the web and simulator go before the ingester and broker.
  for (const { child } of alive.reverse()) child.kill("SIGTERM");
  await Promise.race([
    Promise.all(alive.map(({ child }) => new Promise((r) => child.once("exit", r)))),
    new Promise((r) => setTimeout(r, 8000)),
  ]);
  for (const { child } of alive) if (child.exitCode === null && child.signalCode === null) child.kill("SIGKILL");
  process.exit(exitCode);
}

export function stopOnSignals(): void {
  for (const sig of ["SIGINT", "SIGTERM"] as const) {
    process.once(sig, () => {
      console.log(`\n[airkeep] ${sig}: stopping…`);
      void stopAll(0);
    });
  }
}
