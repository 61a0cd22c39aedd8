// The command palette's state: one search over commands and today's jobs (a few dozen records, searched here, kept
// live from the board), vehicles (loaded by a Web Worker, searched on the page or in the worker depending on the
// list's size: vehicle-search.svelte.ts) and customers from the server (pg_trgm), debounced and cancelled when stale.
// The recent picks persist per user in localStorage.
import { z } from 'zod';
import { createIndex, search, type SearchRecord } from '$lib/search';
import { vehicleRecord, type VehicleHit } from '$lib/search/vehicles';
import type { Command } from '$lib/console/commands';
import type { JobView } from '$lib/schemas/floor';
import type { VehicleEntry } from '$lib/schemas/vehicles';
import type { CustomerHit } from '$lib/schemas/customers';
import { VehicleSearch, type VehicleIndexState } from './vehicle-search.svelte';

export type { CustomerHit, VehicleEntry };
export { vehicleRecord };

export interface Result {
	key: string;
	kind: 'command' | 'job' | 'vehicle' | 'customer';
	id: string;
	text: string;
	ranges: [number, number][];
}

const digits = (s: string) => s.replace(/\D/g, '');

export function jobRecord(job: JobView): SearchRecord {
	return {
		id: `job:${job.id}`,
		kind: 'job',
		text: `#${job.number} ${job.customer.name} ${job.plate} ${job.vehicle?.label ?? ''}`.trim(),
		aliases: [String(job.number), digits(job.customer.phone), job.plate.replace(/\s/g, '')].filter(Boolean)
	};
}

export function commandRecord(c: Command): SearchRecord {
	return { id: `command:${c.id}`, kind: 'command', text: c.title, aliases: c.keywords };
}

const LOCAL_LIMIT = 12;
const VEHICLE_LIMIT = 8;
const CUSTOMER_LIMIT = 8;
const RECENT_LIMIT = 8;

/** The most results of each kind the palette can show at once (its list keeps a slot for each). */
export const RESULT_SLOTS = {
	command: LOCAL_LIMIT,
	job: LOCAL_LIMIT,
	vehicle: Math.max(VEHICLE_LIMIT, RECENT_LIMIT),
	customer: CUSTOMER_LIMIT
} as const;

/** What a recent pick keeps in storage: enough to show it and to check it still exists. */
const recentSchema = z.array(
	z.object({
		kind: z.enum(['command', 'job', 'vehicle']),
		id: z.string().min(1).max(100),
		text: z.string().max(500)
	})
);
type Recent = z.infer<typeof recentSchema>[number];

/** The part of the Web Storage API the recent picks use. */
export type RecentStorage = Pick<Storage, 'getItem' | 'setItem'>;

function browserStorage(): RecentStorage | undefined {
	try {
		return typeof window === 'undefined' ? undefined : window.localStorage;
	} catch {
		return undefined; // storage disabled by the browser's settings
	}
}

/** The stored picks, or none when there are none, they cannot be read, or they do not have the expected shape. */
export function readRecent(storage: RecentStorage | undefined, key: string | undefined): Recent[] {
	if (!storage || !key) return [];
	try {
		const raw = storage.getItem(key);
		const parsed = raw === null ? null : recentSchema.safeParse(JSON.parse(raw));
		return parsed?.success ? parsed.data.slice(0, RECENT_LIMIT) : [];
	} catch {
		return [];
	}
}

function writeRecent(storage: RecentStorage | undefined, key: string | undefined, recent: Recent[]) {
	if (!storage || !key) return;
	try {
		storage.setItem(key, JSON.stringify(recent));
	} catch {
		// storage full or disabled: the picks are still kept for this page
	}
}

const result = (kind: Result['kind'], id: string, text: string, ranges: [number, number][] = []): Result => ({
	key: `${kind}:${id}`,
	kind,
	id,
	text,
	ranges
});

// One vehicle index per page, shared by every palette (and so by intake); its worker starts on the first load().
let vehicles: VehicleSearch | null = null;
function vehicleSearch(): VehicleSearch {
	vehicles ??= new VehicleSearch();
	return vehicles;
}

export class Palette {
	open = $state(false);
	customers = $state<CustomerHit[]>([]);
	loadingCustomers = $state(false);
	#query = $state('');
	#recent = $state.raw<Recent[]>([]);
	/**
	 * What the results show: a query and the vehicles found for it. While the worker works on a newer query the
	 * previous results stay, and the local ones wait for its vehicles, so a keystroke renders once, not twice.
	 */
	#shown = $state.raw<{ query: string; vehicles: VehicleHit[] }>({ query: '', vehicles: [] });
	#vehicles = vehicleSearch();
	#paletteChannel = this.#vehicles.channel();
	#intakeChannel = this.#vehicles.channel();
	#abort: AbortController | null = null;
	#timer: ReturnType<typeof setTimeout> | undefined;

	readonly commands: () => Command[];
	readonly jobs: () => JobView[];
	readonly fetcher: typeof fetch;
	readonly storageKey: string | undefined;
	readonly #storage: RecentStorage | undefined;

	/**
	 * `storageKey` (e.g. `lugline:recent:<userId>`) keeps the recent picks in localStorage across reloads; without it
	 * they last as long as the page. `storage` replaces localStorage (tests).
	 */
	constructor(
		commands: () => Command[],
		jobs: () => JobView[],
		fetcher: typeof fetch = (input, init) => fetch(input, init),
		storageKey?: string,
		storage: RecentStorage | undefined = browserStorage()
	) {
		this.commands = commands;
		this.jobs = jobs;
		this.fetcher = fetcher;
		this.storageKey = storageKey;
		this.#storage = storage;
		this.#recent = readRecent(storage, storageKey);
	}

	/** What is typed. Setting it searches the vehicles at once (or asks the worker); the results follow. */
	get query(): string {
		return this.#query;
	}
	set query(value: string) {
		this.#query = value;
		this.#askVehicles();
	}

	get vehicleState(): VehicleIndexState {
		return this.#vehicles.state;
	}

	#askVehicles() {
		const query = this.#query;
		const q = query.trim();
		const here = q ? this.#vehicles.searchHere(q, VEHICLE_LIMIT) : [];
		if (here || this.#vehicles.state !== 'ready') {
			// Answered on this page, or nothing to ask yet (a loading index asks again once it is ready).
			this.#paletteChannel.cancel();
			this.#shown = { query, vehicles: here ?? [] };
			return;
		}
		void this.#paletteChannel.ask(q, VEHICLE_LIMIT).then((hits) => {
			if (hits) this.#shown = { query, vehicles: hits };
		});
	}

	/** Loads the vehicle index once per page; later palettes reuse it. Resolves whether it is ready. */
	loadVehicles(): Promise<boolean> {
		const ready = this.#vehicles.load();
		void ready.then((ok) => {
			if (ok) this.#askVehicles();
		});
		return ready;
	}

	// Methods, not field reads: TypeScript refuses fields used in `$derived(...)` before the constructor sets them.
	#records(): SearchRecord[] {
		return [...this.commands().map(commandRecord), ...this.jobs().map(jobRecord)];
	}

	// Commands and today's jobs: a few dozen records, rebuilt when the floor's jobs change.
	#localRecords = $derived(this.#records());
	#local = $derived(createIndex(this.#localRecords));
	#localTexts = $derived(new Map(this.#localRecords.map((r) => [r.id, r.text])));
	#localResults = $derived.by((): Result[] => {
		const q = this.#shown.query.trim();
		if (!q) return [];
		return search(this.#local, q, LOCAL_LIMIT).map((h) =>
			result(h.kind as Result['kind'], h.id.slice(h.id.indexOf(':') + 1), this.#localTexts.get(h.id) ?? h.id, h.ranges)
		);
	});

	/** The recent picks that still exist (a job still on today's floor, a command this role still has), newest first. */
	#recentShown = $derived.by((): Result[] => {
		const jobs = new Map(this.jobs().map((j) => [String(j.id), j]));
		const commands = new Map(this.commands().map((c) => [c.id, c]));
		const out: Result[] = [];
		for (const r of this.#recent) {
			if (r.kind === 'job') {
				const job = jobs.get(r.id);
				if (job) out.push(result('job', r.id, jobRecord(job).text));
			} else if (r.kind === 'command') {
				const command = commands.get(r.id);
				if (command) out.push(result('command', r.id, command.title));
			} else {
				// Vehicles live in the worker's index; the vehicle data changes rarely, and a vanished one shows as not found.
				out.push(result('vehicle', r.id, r.text));
			}
		}
		return out;
	});

	/** Local results, then vehicles, ranked within each; the recent picks when the query is empty. */
	results = $derived.by((): Result[] => {
		if (!this.#shown.query.trim()) return this.#recentShown;
		const vehicles = this.#shown.vehicles.map((h) => result('vehicle', h.id, h.text, h.ranges));
		return [...this.#localResults, ...vehicles];
	});

	/**
	 * The query the shown results fully answer, vehicles included; null while the worker's answer is on its way. The
	 * palette puts it in the DOM (`data-results-for`), where the browser benchmark and tests wait for it.
	 */
	resultsFor = $derived.by((): string | null =>
		this.#shown.query === this.#query && (this.#vehicles.state !== 'loading' || !this.#query.trim())
			? this.#query
			: null
	);

	/** Asks the server for customers, 150 ms after the last keystroke; an older answer never overwrites a newer one. */
	searchCustomers(): void {
		clearTimeout(this.#timer);
		this.#abort?.abort();
		const q = this.#query.trim();
		if (q.length < 2) {
			this.customers = [];
			return;
		}
		this.#timer = setTimeout(async () => {
			const abort = (this.#abort = new AbortController());
			this.loadingCustomers = true;
			try {
				const r = await this.fetcher(`/api/customers?q=${encodeURIComponent(q)}&limit=${CUSTOMER_LIMIT}`, {
					signal: abort.signal
				});
				if (r.ok) this.customers = (await r.json()).customers;
			} catch {
				// aborted by a newer keystroke, or the network is away: keep what is shown
			} finally {
				if (this.#abort === abort) this.loadingCustomers = false;
			}
		}, 150);
	}

	/**
	 * Vehicles for intake's vehicle pick, from the worker (waiting for the index while it loads; none when it cannot
	 * load). Resolves `null` when a later call superseded this one, so only the answer to the latest query counts.
	 */
	vehicleMatches(query: string, limit: number): Promise<{ id: string; text: string }[] | null> {
		return this.#intakeChannel.ask(query, limit);
	}

	remember(picked: Result): void {
		if (picked.kind === 'customer') return;
		const kept = this.#recentShown
			.filter((r) => r.key !== picked.key)
			.map((r) => ({ kind: r.kind as Recent['kind'], id: r.id, text: r.text }));
		this.#recent = [{ kind: picked.kind, id: picked.id, text: picked.text }, ...kept].slice(0, RECENT_LIMIT);
		writeRecent(this.#storage, this.storageKey, this.#recent);
	}

	show(): void {
		this.query = '';
		this.customers = [];
		this.open = true;
		void this.loadVehicles();
	}
}

/** The text cut into plain and matched pieces, for highlighting. */
export function segments(text: string, ranges: readonly [number, number][]): { text: string; hit: boolean }[] {
	const out: { text: string; hit: boolean }[] = [];
	let at = 0;
	for (const [start, end] of [...ranges].sort((a, b) => a[0] - b[0])) {
		if (start < at) continue;
		if (start > at) out.push({ text: text.slice(at, start), hit: false });
		out.push({ text: text.slice(start, end), hit: true });
		at = end;
	}
	if (at < text.length) out.push({ text: text.slice(at), hit: false });
	return out;
}
