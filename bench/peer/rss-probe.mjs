// Preload for the end-to-end bench (node --import): on exit, prints the process's peak resident
// set (KiB, every thread included) as "maxrss N" and its CPU time (ms, user + system, every
// thread) as "cpu N" to stderr, the figures the bench table reports.
process.on("exit", () => {
  const usage = process.resourceUsage();
  const cpu = Math.round((usage.userCPUTime + usage.systemCPUTime) / 1000);
  process.stderr.write(`maxrss ${usage.maxRSS}\ncpu ${cpu}\n`);
});
