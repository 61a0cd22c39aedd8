// The server's log: one JSON object per line on standard output (pino), with UTC ISO 8601 timestamps. Values a
// request supplies (an e-mail typed at sign-in, a path) only ever appear inside JSON strings, where a newline is
// written as `\n`, so input cannot start a line of its own and pass for another entry.
import pino from 'pino';

const level = process.env.LOG_LEVEL ?? 'info';

export const log = pino(
	{
		level,
		timestamp: pino.stdTimeFunctions.isoTime,
		formatters: { level: (label) => ({ level: label }) },
		base: { pid: process.pid }
	},
	// Synchronous: an entry written just before the process dies is not lost in a buffer.
	pino.destination({ dest: 1, sync: true })
);

/** Error details for the log only; never sent to a client. */
export function errorDetails(error: unknown): Record<string, unknown> {
	if (error instanceof Error) {
		const { code } = error as { code?: unknown };
		return { name: error.name, message: error.message, code, stack: error.stack };
	}
	return { message: String(error) };
}
