// The one registry of console commands (STYLE.md habit 5): each command is defined once, and the global shortcuts,
// the help overlay and (with issue 5) the palette all read this list. Shortcut matching is left to hotkeys-js,
// which ignores keys typed into fields.
import type { Role } from '$lib/roles';
import type { Board } from '$lib/state/board.svelte';
import type { JobView } from '$lib/schemas/floor';
import * as pick from './selection';
import type { Move, Selection } from './selection';

export interface ConsoleContext {
	role: Role;
	board: Board;
	/** Jobs in screen order: the waiting line, then each bay's jobs in queue order. */
	order(): JobView[];
	selection(): Selection | null;
	select(selection: Selection | null): void;
	toggleHelp(): void;
	openPalette(): void;
	openIntake(): void;
	openCalculators(): void;
	say(message: string): void;
	/** Leaves the console for another page of the app (the manager's pages). */
	navigate(path: string): void;
}

export interface Command {
	id: string;
	title: string;
	/** A word or two for the status line. */
	label: string;
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
const managers = ['manager'] as const;

/**
 * A manager's way to a manage page: from the palette, the status line (with nothing selected) or Alt+Shift+digit,
 * which clashes with no floor key (hotkeys-js matches modifiers exactly, so Shift+digit still selects a bay).
 */
function manage(id: string, path: string, title: string, label: string, keywords: string[], digit: number): Command {
	return {
		id: `manage-${id}`,
		title,
		label,
		keywords: ['manage', 'manager', ...keywords],
		keys: [`alt+shift+${digit}`],
		roles: managers,
		run: (ctx) => ctx.navigate(path)
	};
}

function step(ctx: ConsoleContext, by: number) {
	const jobs = ctx.order();
	if (jobs.length === 0) return;
	const at = jobs.findIndex((j) => j.id === pick.jobOf(ctx.board, ctx.selection())?.id);
	const next = at < 0 ? (by > 0 ? 0 : jobs.length - 1) : Math.min(Math.max(at + by, 0), jobs.length - 1);
	ctx.select({ kind: 'job', jobId: jobs[next].id });
}

async function report(ctx: ConsoleContext, outcome: Promise<{ ok: true } | { ok: false; message: string }>) {
	const result = await outcome;
	if (!result.ok) ctx.say(result.message);
}

/** Sends a move to the board (optimistic; a refusal rolls back and is said in words). */
export function move(ctx: ConsoleContext, m: Move | null) {
	if (!m) return;
	return report(ctx, ctx.board.moveWheels(m.wheelIds, m.bayId, m.queuePosition));
}

function sendToBay(n: number): Command {
	return {
		id: `send-to-bay-${n}`,
		title: `Send the selection's queued wheels to bay ${n}`,
		label: `to bay ${n}`,
		keywords: ['move', 'bay', 'assign', String(n)],
		keys: [String(n)],
		roles: leads,
		when: (ctx) =>
			ctx.board.lanes.length >= n && pick.sendTo(ctx.board, ctx.selection(), ctx.board.lanes[n - 1].id) !== null,
		run: (ctx) => {
			const bay = ctx.board.lanes[n - 1];
			if (!bay.active) return ctx.say(`Bay ${bay.code} is out of service.`);
			return move(ctx, pick.sendTo(ctx.board, ctx.selection(), bay.id));
		}
	};
}

function selectBay(n: number): Command {
	return {
		id: `select-bay-${n}`,
		title: `Select bay ${n}'s queue`,
		label: `bay ${n}`,
		keywords: ['bay', 'queue', 'lane', String(n)],
		keys: [`shift+${n}`],
		roles: everyone,
		when: (ctx) => ctx.board.lanes.length >= n,
		run: (ctx) => ctx.select({ kind: 'bay', bayId: ctx.board.lanes[n - 1].id })
	};
}

export const commands: Command[] = [
	{
		id: 'select-next',
		title: 'Select the next job',
		label: 'next job',
		keywords: ['down', 'next'],
		keys: ['down', 'j'],
		roles: everyone,
		run: (ctx) => step(ctx, 1)
	},
	{
		id: 'select-previous',
		title: 'Select the previous job',
		label: 'previous job',
		keywords: ['up', 'previous'],
		keys: ['up', 'k'],
		roles: everyone,
		run: (ctx) => step(ctx, -1)
	},
	{
		id: 'next-wheel',
		title: "Select the selected job's next wheel",
		label: 'next wheel',
		keywords: ['wheel', 'right', 'next'],
		keys: ['right', 'l'],
		roles: everyone,
		when: (ctx) => pick.stepWheel(ctx.board, ctx.selection(), 1) !== null,
		run: (ctx) => ctx.select(pick.stepWheel(ctx.board, ctx.selection(), 1))
	},
	{
		id: 'previous-wheel',
		title: "Select the selected job's previous wheel",
		label: 'previous wheel',
		keywords: ['wheel', 'left', 'previous'],
		keys: ['left', 'h'],
		roles: everyone,
		when: (ctx) => pick.stepWheel(ctx.board, ctx.selection(), -1) !== null,
		run: (ctx) => ctx.select(pick.stepWheel(ctx.board, ctx.selection(), -1))
	},
	...[1, 2, 3, 4, 5, 6, 7, 8, 9].map(selectBay),
	{
		id: 'clear-selection',
		title: 'Clear the selection',
		label: 'clear',
		keywords: ['escape', 'deselect'],
		keys: ['esc'],
		roles: everyone,
		when: (ctx) => ctx.selection() !== null,
		run: (ctx) => ctx.select(null)
	},
	...[1, 2, 3, 4, 5, 6, 7, 8, 9].map(sendToBay),
	{
		id: 'move-earlier',
		title: 'Move the selection one place earlier in its bay',
		label: 'earlier',
		keywords: ['reorder', 'up', 'earlier', 'sooner', 'priority'],
		keys: ['shift+up', 'shift+k'],
		roles: leads,
		when: (ctx) => pick.reorder(ctx.board, ctx.selection(), -1) !== null,
		run: (ctx) => move(ctx, pick.reorder(ctx.board, ctx.selection(), -1))
	},
	{
		id: 'move-later',
		title: 'Move the selection one place later in its bay',
		label: 'later',
		keywords: ['reorder', 'down', 'later'],
		keys: ['shift+down', 'shift+j'],
		roles: leads,
		when: (ctx) => pick.reorder(ctx.board, ctx.selection(), 1) !== null,
		run: (ctx) => move(ctx, pick.reorder(ctx.board, ctx.selection(), 1))
	},
	{
		id: 'back-to-waiting',
		title: "Take the selection's queued wheels back to the waiting line",
		label: 'to waiting',
		keywords: ['unassign', 'waiting', 'back'],
		keys: ['w'],
		roles: leads,
		when: (ctx) => pick.backToWaiting(ctx.board, ctx.selection()) !== null,
		run: (ctx) => move(ctx, pick.backToWaiting(ctx.board, ctx.selection()))
	},
	{
		id: 'start-wheel',
		title: 'Start the selected wheel, or the next queued one of the job or bay',
		label: 'start',
		keywords: ['start', 'begin', 'work'],
		keys: ['s'],
		roles: hands,
		when: (ctx) => pick.toStart(ctx.board, ctx.selection()) !== undefined,
		run: (ctx) => report(ctx, ctx.board.patchWheel(pick.toStart(ctx.board, ctx.selection())!.id, { state: 'working' }))
	},
	{
		id: 'finish-wheel',
		title: 'Finish the wheel being worked on in the selection',
		label: 'finish',
		keywords: ['finish', 'done', 'complete'],
		keys: ['f'],
		roles: hands,
		when: (ctx) => pick.toFinish(ctx.board, ctx.selection()) !== undefined,
		run: (ctx) => report(ctx, ctx.board.patchWheel(pick.toFinish(ctx.board, ctx.selection())!.id, { state: 'done' }))
	},
	{
		id: 'new-job',
		title: 'Take in a new job',
		label: 'new job',
		keywords: ['intake', 'new', 'job', 'customer', 'add'],
		keys: ['n'],
		roles: ['writer', 'lead', 'manager'],
		run: (ctx) => ctx.openIntake()
	},
	{
		id: 'calculators',
		title: 'Open the calculators',
		label: 'calculators',
		keywords: ['calculator', 'pressure', 'weight', 'size', 'bolt', 'load', 'speed', 'dot', 'age', 'pace'],
		keys: ['c'],
		roles: ['writer', 'lead', 'tech', 'manager'],
		run: (ctx) => ctx.openCalculators()
	},
	{
		id: 'open-palette',
		title: 'Search jobs, customers, vehicles and commands',
		label: 'search',
		keywords: ['search', 'find', 'palette', 'go'],
		keys: ['/', 'ctrl+k'],
		roles: everyone,
		run: (ctx) => ctx.openPalette()
	},
	{
		id: 'help',
		title: 'Show or hide the list of keys',
		label: 'all keys',
		keywords: ['help', 'keys', 'shortcuts'],
		keys: ['shift+/'],
		roles: everyone,
		run: (ctx) => ctx.toggleHelp()
	},
	manage(
		'staff',
		'/manage',
		'Manage staff: people, roles, passwords and PINs',
		'staff',
		['staff', 'people', 'users', 'roles', 'pin', 'password'],
		1
	),
	manage(
		'bays',
		'/manage/bays',
		'Manage bays: add, rename, reorder, out of service',
		'bays',
		['bays', 'lanes', 'out of service'],
		2
	),
	manage(
		'services',
		'/manage/services',
		'Manage services and standard minutes',
		'services',
		['services', 'standard minutes', 'balance'],
		3
	),
	manage(
		'settings',
		'/manage/settings',
		'Store settings: units, targets, limits, notices, time zone',
		'settings',
		['settings', 'units', 'target', 'limits', 'time zone', 'notices'],
		4
	),
	manage(
		'reports',
		'/manage/reports',
		'Reports: wheels per hour, pace, promises kept, waiting',
		'reports',
		['reports', 'throughput', 'pace', 'promises', 'waiting', 'csv'],
		5
	)
];

export function commandsFor(role: Role): Command[] {
	return commands.filter((c) => c.roles.includes(role));
}

/** How a key name reads on screen. */
export function keyLabel(key: string): string {
	const names: Record<string, string> = {
		down: '↓',
		up: '↑',
		left: '←',
		right: '→',
		esc: 'Esc',
		'shift+/': '?',
		'ctrl+k': 'Ctrl+K'
	};
	if (names[key]) return names[key];
	if (key.startsWith('shift+')) return `Shift+${keyLabel(key.slice(6))}`;
	return key.toUpperCase();
}
