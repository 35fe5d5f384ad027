// Preload for the end-to-end bench (node --import): on exit, prints the process's peak resident
// set (KiB, every thread included) to stderr as "maxrss N", the figure the bench table reports.
process.on("exit", () => {
  process.stderr.write(`maxrss ${process.resourceUsage().maxRSS}\n`);
});
