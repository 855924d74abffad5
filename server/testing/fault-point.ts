/**
 * Test-only crash points. With NODE_ENV=test and STAGEWRIGHT_FAULT=<name>,
 * reaching `faultPoint(<name>)` kills this process at once with SIGKILL, as
 * `kill -9` would: no cleanup, no rollback sent, the connection just drops.
 * Outside tests it does nothing. tests/api/faults.test.ts uses it to prove a
 * multi-table save is wholly present or wholly absent after a crash.
 */
export async function faultPoint(name: string): Promise<void> {
  if (process.env.NODE_ENV !== "test" || process.env.STAGEWRIGHT_FAULT !== name) return;
  process.kill(process.pid, "SIGKILL");
  // SIGKILL cannot be caught; never go on in the meantime.
  await new Promise(() => {});
}
