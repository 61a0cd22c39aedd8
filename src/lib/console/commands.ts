// The one registry of console commands (STYLE.md habit 5): each command is defined once, and the global shortcuts,
// the help overlay and (with issue 5) the palette all read this list. Shortcut matching is left to hotkeys-js,
// which ignores keys typed into fields.
import type { Role } from '$lib/roles';
import type { Board } from '$lib/state/board.svelte';
import type { JobView, WheelView } from '$lib/schemas/floor';

export interface ConsoleContext {
	role: Role;
	board: Board;
	/** Jobs in screen order: the waiting line, then each bay's jobs in queue order. */
	order(): JobView[];
	selected(): JobView | undefined;
	select(jobId: number | null): void;
	toggleHelp(): void;
	openPalette(): void;
	openIntake(): void;
	openCalculators(): void;
	say(message: string): void;
}

export interface Command {
	id: string;
	title: string;
	keywords: string[];
	/** hotkeys-js key names; the first is shown in the status line and the help. */
	keys: string[];
	roles: readonly Role[];
	/** Whether the command applies now (e.g. a job is selected). */
	when?: (ctx: ConsoleContext) => boolean;
	run: (ctx: ConsoleContext) => void | Promise<void>;
}

const everyone = ['writer', 'lead', 'tech', 'manager'] as const;
const leads = ['lead', 'manager'] as const;
const hands = ['lead', 'tech', 'manager'] as const;

function step(ctx: ConsoleContext, by: number) {
	const jobs = ctx.order();
	if (jobs.length === 0) return;
	const at = jobs.findIndex((j) => j.id === ctx.selected()?.id);
	const next = at < 0 ? (by > 0 ? 0 : jobs.length - 1) : Math.min(Math.max(at + by, 0), jobs.length - 1);
	ctx.select(jobs[next].id);
}

/** Queued wheels of the selected job, in or out of a bay: the ones a lead can still send somewhere. */
function movable(ctx: ConsoleContext): WheelView[] {
	const job = ctx.selected();
	return job ? ctx.board.wheelsOf(job.id).filter((w) => w.state === 'queued') : [];
}

async function report(ctx: ConsoleContext, outcome: Promise<{ ok: true } | { ok: false; message: string }>) {
	const result = await outcome;
	if (!result.ok) ctx.say(result.message);
}

function sendToBay(n: number): Command {
	return {
		id: `send-to-bay-${n}`,
		title: `Send the selected job's queued wheels to bay ${n}`,
		keywords: ['move', 'bay', 'assign', String(n)],
		keys: [String(n)],
		roles: leads,
		when: (ctx) => movable(ctx).length > 0 && ctx.board.lanes.length >= n,
		run: (ctx) => {
			const bay = ctx.board.lanes[n - 1];
			if (!bay.active) return ctx.say(`Bay ${bay.code} is out of service.`);
			return report(
				ctx,
				ctx.board.moveWheels(
					movable(ctx).map((w) => w.id),
					bay.id
				)
			);
		}
	};
}

export const commands: Command[] = [
	{
		id: 'select-next',
		title: 'Select the next job',
		keywords: ['down', 'next'],
		keys: ['down', 'j'],
		roles: everyone,
		run: (ctx) => step(ctx, 1)
	},
	{
		id: 'select-previous',
		title: 'Select the previous job',
		keywords: ['up', 'previous'],
		keys: ['up', 'k'],
		roles: everyone,
		run: (ctx) => step(ctx, -1)
	},
	{
		id: 'clear-selection',
		title: 'Clear the selection',
		keywords: ['escape', 'deselect'],
		keys: ['esc'],
		roles: everyone,
		when: (ctx) => ctx.selected() !== undefined,
		run: (ctx) => ctx.select(null)
	},
	...[1, 2, 3, 4, 5, 6, 7, 8, 9].map(sendToBay),
	{
		id: 'back-to-waiting',
		title: "Take the selected job's queued wheels back to the waiting line",
		keywords: ['unassign', 'waiting', 'back'],
		keys: ['w'],
		roles: leads,
		when: (ctx) => movable(ctx).some((w) => w.bayId !== null),
		run: (ctx) =>
			report(
				ctx,
				ctx.board.moveWheels(
					movable(ctx)
						.filter((w) => w.bayId !== null)
						.map((w) => w.id),
					null
				)
			)
	},
	{
		id: 'start-wheel',
		title: 'Start the next queued wheel of the selected job (in its bay)',
		keywords: ['start', 'begin', 'work'],
		keys: ['s'],
		roles: hands,
		when: (ctx) => movable(ctx).some((w) => w.bayId !== null),
		run: (ctx) => {
			const next = movable(ctx).find((w) => w.bayId !== null)!;
			return report(ctx, ctx.board.patchWheel(next.id, { state: 'working' }));
		}
	},
	{
		id: 'finish-wheel',
		title: 'Finish the wheel being worked on for the selected job',
		keywords: ['finish', 'done', 'complete'],
		keys: ['f'],
		roles: hands,
		when: (ctx) => {
			const job = ctx.selected();
			return !!job && ctx.board.wheelsOf(job.id).some((w) => w.state === 'working');
		},
		run: (ctx) => {
			const working = ctx.board.wheelsOf(ctx.selected()!.id).find((w) => w.state === 'working')!;
			return report(ctx, ctx.board.patchWheel(working.id, { state: 'done' }));
		}
	},
	{
		id: 'new-job',
		title: 'Take in a new job',
		keywords: ['intake', 'new', 'job', 'customer', 'add'],
		keys: ['n'],
		roles: ['writer', 'lead', 'manager'],
		run: (ctx) => ctx.openIntake()
	},
	{
		id: 'calculators',
		title: 'Open the calculators',
		keywords: ['calculator', 'pressure', 'weight', 'size', 'bolt', 'load', 'speed', 'dot', 'age', 'pace'],
		keys: ['c'],
		roles: ['writer', 'lead', 'tech', 'manager'],
		run: (ctx) => ctx.openCalculators()
	},
	{
		id: 'open-palette',
		title: 'Search jobs, customers, vehicles and commands',
		keywords: ['search', 'find', 'palette', 'go'],
		keys: ['/', 'ctrl+k'],
		roles: everyone,
		run: (ctx) => ctx.openPalette()
	},
	{
		id: 'help',
		title: 'Show or hide the list of keys',
		keywords: ['help', 'keys', 'shortcuts'],
		keys: ['shift+/'],
		roles: everyone,
		run: (ctx) => ctx.toggleHelp()
	}
];

export function commandsFor(role: Role): Command[] {
	return commands.filter((c) => c.roles.includes(role));
}

/** How a key name reads on screen. */
export function keyLabel(key: string): string {
	const names: Record<string, string> = { down: '↓', up: '↑', esc: 'Esc', 'shift+/': '?', 'ctrl+k': 'Ctrl+K' };
	return names[key] ?? key.toUpperCase();
}
