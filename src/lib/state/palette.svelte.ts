// The command palette's state: one search over commands, today's jobs (kept live from the board) and vehicles (a
// compact index loaded once), plus customers from the server (pg_trgm), debounced and cancelled when stale.
import { createIndex, search, type SearchHit, type SearchRecord } from '$lib/search';
import type { Command } from '$lib/console/commands';
import type { JobView } from '$lib/schemas/floor';
import type { VehicleEntry } from '$lib/schemas/vehicles';
import type { CustomerHit } from '$lib/schemas/customers';

export type { CustomerHit, VehicleEntry };

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

export function vehicleRecord(v: VehicleEntry): SearchRecord {
	return {
		id: `vehicle:${v.id}`,
		kind: 'vehicle',
		text: `${v.label} ${v.sizes.join(' ')}`,
		aliases: v.sizes.map(digits)
	};
}

export function commandRecord(c: Command): SearchRecord {
	return { id: `command:${c.id}`, kind: 'command', text: c.title, aliases: c.keywords };
}

let vehicleIndex: ReturnType<typeof createIndex> | null = null;
const vehicleTexts = new Map<string, string>();
let vehicleLoad: Promise<void> | null = null;

export class Palette {
	open = $state(false);
	query = $state('');
	customers = $state<CustomerHit[]>([]);
	loadingCustomers = $state(false);
	#recent = $state<Result[]>([]);
	#vehiclesReady = $state(false);
	#abort: AbortController | null = null;
	#timer: ReturnType<typeof setTimeout> | undefined;

	readonly commands: () => Command[];
	readonly jobs: () => JobView[];
	readonly fetcher: typeof fetch;

	constructor(
		commands: () => Command[],
		jobs: () => JobView[],
		fetcher: typeof fetch = (input, init) => fetch(input, init)
	) {
		this.commands = commands;
		this.jobs = jobs;
		this.fetcher = fetcher;
	}

	// Methods, not field reads: TypeScript refuses fields used in `$derived(...)` before the constructor sets them.
	#records(): SearchRecord[] {
		return [...this.commands().map(commandRecord), ...this.jobs().map(jobRecord)];
	}

	/** Loads the vehicle index once per page; later palettes reuse it. */
	loadVehicles(): Promise<void> {
		vehicleLoad ??= this.fetcher('/api/vehicles')
			.then((r) => (r.ok ? r.json() : []))
			.then((list: VehicleEntry[]) => {
				const records = list.map(vehicleRecord);
				for (const r of records) vehicleTexts.set(r.id, r.text);
				vehicleIndex = createIndex(records);
			})
			.catch(() => {
				vehicleLoad = null;
			});
		return vehicleLoad.then(() => {
			this.#vehiclesReady = vehicleIndex !== null;
		});
	}

	// Commands and today's jobs: a few dozen records, rebuilt when the floor's jobs change.
	#localRecords = $derived(this.#records());
	#local = $derived(createIndex(this.#localRecords));
	#localTexts = $derived(new Map(this.#localRecords.map((r) => [r.id, r.text])));

	/** Local results, grouped and ranked; the recent picks when the query is empty. */
	results = $derived.by((): Result[] => {
		const q = this.query.trim();
		if (!q) return this.#recent;
		const hits: (SearchHit & { text: string })[] = [];
		for (const h of search(this.#local, q, 12)) hits.push({ ...h, text: this.#localTexts.get(h.id) ?? h.id });
		if (this.#vehiclesReady && vehicleIndex) {
			for (const h of search(vehicleIndex, q, 8)) hits.push({ ...h, text: vehicleTexts.get(h.id) ?? h.id });
		}
		return hits.map((h) => ({
			key: h.id,
			kind: h.kind as Result['kind'],
			id: h.id.split(':')[1],
			text: h.text,
			ranges: h.ranges
		}));
	});

	/** Asks the server for customers, 150 ms after the last keystroke; an older answer never overwrites a newer one. */
	searchCustomers(): void {
		clearTimeout(this.#timer);
		this.#abort?.abort();
		const q = this.query.trim();
		if (q.length < 2) {
			this.customers = [];
			return;
		}
		this.#timer = setTimeout(async () => {
			const abort = (this.#abort = new AbortController());
			this.loadingCustomers = true;
			try {
				const r = await this.fetcher(`/api/customers?q=${encodeURIComponent(q)}&limit=8`, { signal: abort.signal });
				if (r.ok) this.customers = (await r.json()).customers;
			} catch {
				// aborted by a newer keystroke, or the network is away: keep what is shown
			} finally {
				if (this.#abort === abort) this.loadingCustomers = false;
			}
		}, 150);
	}

	/** Vehicles for intake's vehicle pick, once the index has loaded. */
	vehicleMatches(query: string, limit: number): { id: string; text: string }[] {
		if (!this.#vehiclesReady || !vehicleIndex) return [];
		return search(vehicleIndex, query, limit).map((h) => ({
			id: h.id.split(':')[1],
			text: vehicleTexts.get(h.id) ?? h.id
		}));
	}

	remember(result: Result): void {
		this.#recent = [result, ...this.#recent.filter((r) => r.key !== result.key)].slice(0, 8);
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
