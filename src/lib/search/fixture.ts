/**
 * Invented search records for the relevance tests and the palette benchmark: a handful of hand-written records the
 * hurried queries aim at, buried in deterministic noise (seeded PRNG) of the same shapes. Every make, model and person
 * here is made up. The noise draws tire sizes from a common pool that leaves out the anchors' sizes, as a store's real
 * mix has many sizes only a few vehicles take.
 */
import type { SearchRecord } from './index';
import type { VehicleEntry } from '$lib/schemas/vehicles';
// The seeds' generator: the same sequence on every engine, defined once.
import { mulberry32 as prng } from '../../../seeds/lib/prng';

export interface HurriedQuery {
	query: string;
	/** The record that must be in the top 3. */
	expect: string;
	why: string;
}

export const anchors: SearchRecord[] = [
	{ id: 'v-lira-14', kind: 'vehicle', text: '2014–2019 Corvane Lira LX 215/55R17', aliases: ['2155517'] },
	{ id: 'v-lira-08', kind: 'vehicle', text: '2008–2013 Corvane Lira SE 205/60R16', aliases: ['2056016'] },
	{ id: 'v-brisk', kind: 'vehicle', text: '2016–2021 Tessaro Brisk GT 225/45R18', aliases: ['2254518'] },
	{ id: 'v-dravane', kind: 'vehicle', text: '2011–2017 Oskelu Dravane 4WD 265/70R17', aliases: ['2657017'] },
	{ id: 'v-moray', kind: 'vehicle', text: '2019–2024 Vantrel Moray Touring 235/60R18', aliases: ['2356018'] },
	{ id: 'v-lodun', kind: 'vehicle', text: '2015–2020 Brivant Lodun Sport 225/60R16', aliases: ['2256016'] },
	{
		id: 'c-quennell',
		kind: 'customer',
		text: 'Halvard Quennell 412-555-0142 KTR 418 Corvane Lira',
		aliases: ['4125550142', 'ktr418']
	},
	{
		id: 'c-ostrander',
		kind: 'customer',
		text: 'Maribeth Ostrander 718-555-0167 PLV 2093 Tessaro Brisk',
		aliases: ['7185550167', 'plv2093']
	},
	{
		id: 'c-sollacourt',
		kind: 'customer',
		text: 'Edvin Sollacourt 303-555-0119 ZUM 771 Brivant Lodun',
		aliases: ['3035550119', 'zum771']
	},
	{
		id: 'c-brannaway',
		kind: 'customer',
		text: 'Ottilie Brannaway 614-555-0188 HXE 5520 Oskelu Dravane',
		aliases: ['6145550188', 'hxe5520']
	},
	{
		id: 'j-1042',
		kind: 'job',
		text: 'job 1042 Halvard Quennell KTR 418 Corvane Lira 215/55R17',
		aliases: ['ktr418', '2155517']
	},
	{
		id: 'j-1187',
		kind: 'job',
		text: 'job 1187 Maribeth Ostrander PLV 2093 Tessaro Brisk 225/45R18',
		aliases: ['plv2093', '2254518']
	},
	{
		id: 'j-2210',
		kind: 'job',
		text: 'job 2210 Ottilie Brannaway HXE 5520 Oskelu Dravane 265/70R17',
		aliases: ['hxe5520', '2657017']
	},
	{ id: 'cmd-intake', kind: 'command', text: 'Open intake', aliases: ['new job', 'check in'] },
	{ id: 'cmd-compare', kind: 'command', text: 'Tire size compare', aliases: ['calculator', 'plus sizing'] },
	{ id: 'cmd-theme', kind: 'command', text: 'Toggle light or dark theme' },
	{ id: 'cmd-waiting', kind: 'command', text: 'Take wheel back to waiting' },
	{ id: 'cmd-pressure', kind: 'command', text: 'Pressure calculator', aliases: ['temperature altitude'] }
];

export const hurriedQueries: HurriedQuery[] = [
	{ query: 'lira 2014', expect: 'v-lira-14', why: 'model and year' },
	{ query: '2014 lira', expect: 'v-lira-14', why: 'out of order' },
	{ query: 'corvnae lira 2014', expect: 'v-lira-14', why: 'adjacent swap in the make' },
	{ query: 'corvane lria 14', expect: 'v-lira-14', why: 'swap in a short model, year fragment' },
	{ query: 'lira 2008', expect: 'v-lira-08', why: 'the other generation' },
	{ query: '2155517', expect: 'v-lira-14', why: 'bare tire size' },
	{ query: '2056016', expect: 'v-lira-08', why: 'bare tire size' },
	{ query: '2256016', expect: 'v-lodun', why: 'bare tire size' },
	{ query: '2254518', expect: 'v-brisk', why: 'bare tire size' },
	{ query: 'brivnt ldoun', expect: 'v-lodun', why: 'dropped letter and swap' },
	{ query: 'ldoun 2015', expect: 'v-lodun', why: 'swap, out of order' },
	{ query: 'tesaro brisk', expect: 'v-brisk', why: 'dropped double letter' },
	{ query: 'brisk 2016', expect: 'v-brisk', why: 'model and year' },
	{ query: 'oskelu dravne', expect: 'v-dravane', why: 'dropped letter' },
	{ query: 'dravane 265', expect: 'v-dravane', why: 'model and width' },
	{ query: 'moray 2019', expect: 'v-moray', why: 'model and year' },
	{ query: 'vantrl moray', expect: 'v-moray', why: 'dropped letter' },
	{ query: 'moray 235', expect: 'v-moray', why: 'model and width' },
	{ query: 'quennel', expect: 'c-quennell', why: 'dropped letter in a surname' },
	{ query: 'quenell halvard', expect: 'c-quennell', why: 'surname first, dropped letter' },
	{ query: 'halvrad quen', expect: 'c-quennell', why: 'swap and a fragment' },
	{ query: '4125550142', expect: 'c-quennell', why: 'phone digits' },
	{ query: '25550142', expect: 'c-quennell', why: 'phone fragment' },
	{ query: 'ktr418', expect: 'c-quennell', why: 'plate without the space' },
	{ query: 'ktr 41', expect: 'c-quennell', why: 'plate fragment' },
	{ query: '1042', expect: 'j-1042', why: 'job number' },
	{ query: 'job 1187', expect: 'j-1187', why: 'job number with the word' },
	{ query: '1187 ostrander', expect: 'j-1187', why: 'job number and name' },
	{ query: 'ostrandr', expect: 'c-ostrander', why: 'dropped letter' },
	{ query: 'maribth', expect: 'c-ostrander', why: 'dropped letter in a first name' },
	{ query: '550167 ostr', expect: 'c-ostrander', why: 'phone fragment and name fragment' },
	{ query: 'brannawya', expect: 'c-brannaway', why: 'swap at the end' },
	{ query: 'otilie brann', expect: 'c-brannaway', why: 'dropped letter and fragment' },
	{ query: 'hxe5520', expect: 'c-brannaway', why: 'plate' },
	{ query: '2210', expect: 'j-2210', why: 'job number' },
	{ query: 'sollacort', expect: 'c-sollacourt', why: 'dropped letter' },
	{ query: 'zum 771', expect: 'c-sollacourt', why: 'plate with the space' },
	{ query: 'edvn soll', expect: 'c-sollacourt', why: 'dropped letter and fragment' },
	{ query: 'opn intake', expect: 'cmd-intake', why: 'command with a typo' },
	{ query: 'tire compare', expect: 'cmd-compare', why: 'command words' },
	{ query: 'theme', expect: 'cmd-theme', why: 'command word' },
	{ query: 'pressure calc', expect: 'cmd-pressure', why: 'command fragment' }
];

const ONSETS = [
	'b',
	'br',
	'c',
	'd',
	'dr',
	'f',
	'g',
	'gl',
	'h',
	'j',
	'k',
	'l',
	'm',
	'n',
	'p',
	'pr',
	'r',
	's',
	'st',
	't',
	'tr',
	'v',
	'w',
	'z'
];
const VOWELS = ['a', 'e', 'i', 'o', 'u', 'ai', 'ea', 'io', 'ou'];
const CODAS = ['', '', 'n', 'r', 'l', 's', 'th', 'nd', 'rk', 'm', 'x', 'ck'];
const LETTERS = 'ABCDEFGHJKLMNPRSTUVWXYZ';
const TRIMS = ['LX', 'EX', 'SE', 'GT', 'Sport', 'Touring', 'Base', '4WD', 'Hybrid', 'Limited'];
const WIDTHS = [175, 185, 195, 205, 215, 225, 235, 245, 255, 265, 275];
const ASPECTS = [40, 45, 50, 55, 60, 65, 70, 75];
const RIMS = [14, 15, 16, 17, 18, 19, 20];
const ANCHOR_SIZES = new Set(anchors.flatMap((a) => a.aliases ?? []).filter((a) => /^\d{7}$/.test(a)));

function pick<T>(rand: () => number, xs: readonly T[]): T {
	return xs[Math.floor(rand() * xs.length)];
}

function word(rand: () => number, syllables: number): string {
	let w = '';
	for (let i = 0; i < syllables; i++)
		w += pick(rand, ONSETS) + pick(rand, VOWELS) + (i === syllables - 1 ? pick(rand, CODAS) : '');
	return w[0].toUpperCase() + w.slice(1);
}

/** The invented-noise generators, drawing from one seeded sequence. */
function noise(seed: number) {
	const rand = prng(seed);
	const makes = Array.from({ length: 24 }, () => word(rand, 2 + Math.floor(rand() * 2)));
	const models = makes.map(() => Array.from({ length: 8 }, () => word(rand, 2)));
	const firsts = Array.from({ length: 300 }, () => word(rand, 2 + Math.floor(rand() * 2)));
	const lasts = Array.from({ length: 3000 }, () => word(rand, 2 + Math.floor(rand() * 2)));
	const size = () => {
		for (;;) {
			const w = pick(rand, WIDTHS);
			const a = pick(rand, ASPECTS);
			const r = pick(rand, RIMS);
			const digits = `${w}${a}${r}`;
			if (!ANCHOR_SIZES.has(digits)) return { text: `${w}/${a}R${r}`, digits };
		}
	};
	const vehicle = () => {
		const m = Math.floor(rand() * makes.length);
		const from = 1998 + Math.floor(rand() * 26);
		return { make: makes[m], model: pick(rand, models[m]), from, to: from + 3 + Math.floor(rand() * 4) };
	};
	const person = () => `${pick(rand, firsts)} ${pick(rand, lasts)}`;
	const plate = () => {
		const letters = Array.from({ length: 3 }, () => pick(rand, [...LETTERS])).join('');
		const digits = String(100 + Math.floor(rand() * 9900));
		return { text: `${letters} ${digits}`, joined: `${letters}${digits}`.toLowerCase() };
	};
	const phone = () => {
		const area = 201 + Math.floor(rand() * 780);
		const line = `01${String(Math.floor(rand() * 100)).padStart(2, '0')}`;
		return { text: `${area}-555-${line}`, digits: `${area}555${line}` };
	};
	const trim = () => pick(rand, TRIMS);
	return { rand, size, vehicle, person, plate, phone, trim };
}

/**
 * `count` noise records plus the anchors, spread through the set so neither the first nor the last position favours
 * them. Deterministic: the same count gives the same records, and a bigger count starts with the smaller one's noise.
 */
export function inventedRecords(count: number, seed = 20_260_214): SearchRecord[] {
	const { rand, size, vehicle, person, plate, phone, trim } = noise(seed);
	const out: SearchRecord[] = [];
	const every = Math.max(1, Math.floor(count / anchors.length));
	let nextAnchor = 0;
	let job = 3000;
	for (let i = 0; i < count; i++) {
		if (i % every === Math.floor(every / 2) && nextAnchor < anchors.length) out.push(anchors[nextAnchor++]);
		const roll = rand();
		const v = vehicle();
		if (roll < 0.3) {
			const s = size();
			out.push({
				id: `v${i}`,
				kind: 'vehicle',
				text: `${v.from}–${v.to} ${v.make} ${v.model} ${trim()} ${s.text}`,
				aliases: [s.digits]
			});
		} else if (roll < 0.7) {
			const p = plate();
			const ph = phone();
			out.push({
				id: `c${i}`,
				kind: 'customer',
				text: `${person()} ${ph.text} ${p.text} ${v.make} ${v.model}`,
				aliases: [ph.digits, p.joined]
			});
		} else {
			const p = plate();
			const s = size();
			out.push({
				id: `j${i}`,
				kind: 'job',
				text: `job ${job++} ${person()} ${p.text} ${v.make} ${v.model} ${s.text}`,
				aliases: [p.joined, s.digits]
			});
		}
	}
	while (nextAnchor < anchors.length) out.push(anchors[nextAnchor++]);
	return out;
}

/** The vehicle anchors as GET /api/vehicles sends vehicles, with ids 1–6 (`vehicleAnchorIds` maps the fixture's ids). */
export const vehicleAnchors: VehicleEntry[] = anchors
	.filter((a) => a.kind === 'vehicle')
	.map((a, i) => {
		const words = a.text.split(' ');
		return { id: i + 1, label: words.slice(0, -1).join(' '), sizes: words.slice(-1) };
	});
export const vehicleAnchorIds: Record<string, number> = Object.fromEntries(
	anchors.filter((a) => a.kind === 'vehicle').map((a, i) => [a.id, i + 1])
);

/**
 * `count` vehicles as GET /api/vehicles sends them (the browser benchmark serves these): the vehicle anchors spread
 * through invented ones, a fifth of which have a different rear size. Deterministic, like `inventedRecords`.
 */
export function inventedVehicles(count: number, seed = 20_260_214): VehicleEntry[] {
	const { rand, size, vehicle, trim } = noise(seed);
	const out: VehicleEntry[] = [];
	const every = Math.max(1, Math.floor(count / vehicleAnchors.length));
	let nextAnchor = 0;
	for (let i = 0; out.length < count; i++) {
		if (i % every === Math.floor(every / 2) && nextAnchor < vehicleAnchors.length) {
			out.push(vehicleAnchors[nextAnchor++]);
			continue;
		}
		const v = vehicle();
		const front = size().text;
		const rear = rand() < 0.2 ? size().text : front;
		out.push({
			id: 100 + i,
			label: `${v.from}–${v.to} ${v.make} ${v.model} ${trim()}`,
			sizes: [...new Set([front, rear])]
		});
	}
	return out;
}
