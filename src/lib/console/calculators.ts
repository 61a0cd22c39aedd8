// The trade's calculators as small forms over src/lib/calc: each is a list of fields and a function from their
// values to the lines of its answer. Invalid input surfaces the calc module's RangeError message, which is written
// for a technician to act on. The same definitions serve the console's focus pane and (later) the bay display.
import { staticCouple, splitWeight } from '$lib/calc/balance';
import { boltCircleFromSpacing } from '$lib/calc/bolt-circle';
import { parseDotDate } from '$lib/calc/dot-code';
import { loadIndexToKg, loadIndexToLb, speedSymbolToKmh, speedSymbolToMph } from '$lib/calc/load-speed';
import { pace } from '$lib/calc/pacing';
import { gaugeAtAltitude, pressureAtTemperature } from '$lib/calc/pressure';
import { compareTireSizes, parseTireSize } from '$lib/calc/tire-size';

export interface Field {
	name: string;
	label: string;
	value: string;
}

export interface Calculator {
	id: string;
	title: string;
	fields: Field[];
	compute(v: Record<string, string>): string[];
	/** A caution shown with the answer, where the work can hurt someone (DESIGN.md §10). */
	caution?: string;
}

const num = (v: string, label: string) => {
	const n = Number(v.replace(',', '.'));
	if (v.trim() === '' || !Number.isFinite(n)) throw new RangeError(`${label} must be a number`);
	return n;
};
const f = (n: number, digits = 1) => n.toFixed(digits);

export const calculators: Calculator[] = [
	{
		id: 'pressure-temperature',
		title: 'Pressure at another temperature',
		fields: [
			{ name: 'kpa', label: 'Gauge pressure (kPa)', value: '240' },
			{ name: 'from', label: 'Now at (°C)', value: '20' },
			{ name: 'to', label: 'Will be at (°C)', value: '0' }
		],
		compute: (v) => [
			`${f(pressureAtTemperature(num(v.kpa, 'Gauge pressure'), num(v.from, 'Now at'), num(v.to, 'Will be at')), 2)} kPa gauge`
		],
		caution:
			'Set cold pressures from the vehicle placard; inflate in a cage or with a clip-on chuck, never past the tire’s maximum.'
	},
	{
		id: 'pressure-altitude',
		title: 'Gauge reading at another altitude',
		fields: [
			{ name: 'kpa', label: 'Gauge pressure (kPa)', value: '240' },
			{ name: 'from', label: 'Set at altitude (m)', value: '0' },
			{ name: 'to', label: 'Read at altitude (m)', value: '1600' }
		],
		compute: (v) => [
			`${f(gaugeAtAltitude(num(v.kpa, 'Gauge pressure'), num(v.from, 'Set at'), num(v.to, 'Read at')), 2)} kPa gauge`
		]
	},
	{
		id: 'weight-split',
		title: 'Split a weight behind two spokes',
		fields: [
			{ name: 'g', label: 'Weight (g)', value: '30' },
			{ name: 'deg', label: 'At (° from the valve)', value: '0' },
			{ name: 'a', label: 'Spoke 1 (°)', value: '330' },
			{ name: 'b', label: 'Spoke 2 (°)', value: '30' }
		],
		compute: (v) => {
			const [p, q] = splitWeight(
				{ g: num(v.g, 'Weight'), deg: num(v.deg, 'Angle') },
				num(v.a, 'Spoke 1'),
				num(v.b, 'Spoke 2')
			);
			return [`${f(p.g, 2)} g at ${f(p.deg, 0)}°`, `${f(q.g, 2)} g at ${f(q.deg, 0)}°`];
		}
	},
	{
		id: 'static-couple',
		title: 'Static and couple from two planes',
		fields: [
			{ name: 'ig', label: 'Inner (g)', value: '20' },
			{ name: 'id', label: 'Inner at (°)', value: '0' },
			{ name: 'og', label: 'Outer (g)', value: '20' },
			{ name: 'od', label: 'Outer at (°)', value: '180' }
		],
		compute: (v) => {
			const r = staticCouple(
				{ g: num(v.ig, 'Inner'), deg: num(v.id, 'Inner angle') },
				{ g: num(v.og, 'Outer'), deg: num(v.od, 'Outer angle') }
			);
			return [
				`static ${f(r.static.g, 2)} g at ${f(r.static.deg, 0)}°`,
				`couple ${f(r.couple.g, 2)} g at ${f(r.couple.deg, 0)}° (outer − inner) / 2`
			];
		}
	},
	{
		id: 'tire-compare',
		title: 'Compare two tire sizes',
		fields: [
			{ name: 'from', label: 'Fitted size', value: '225/60R16' },
			{ name: 'to', label: 'New size', value: '235/55R17' }
		],
		compute: (v) => {
			const c = compareTireSizes(parseTireSize(v.from), parseTireSize(v.to));
			return [
				`diameter ${c.diameterDiffMm >= 0 ? '+' : ''}${f(c.diameterDiffMm, 2)} mm (${c.diameterDiffPct >= 0 ? '+' : ''}${f(c.diameterDiffPct, 3)} %)`,
				`speedometer shows 100 km/h at a true ${f(c.trueKmhAtIndicated100, 2)} km/h`
			];
		}
	},
	{
		id: 'bolt-circle',
		title: 'Bolt circle from stud spacing',
		fields: [
			{ name: 's', label: 'Adjacent stud centres (mm)', value: '67.18' },
			{ name: 'n', label: 'Studs', value: '5' }
		],
		compute: (v) => [`bolt circle ${f(boltCircleFromSpacing(num(v.s, 'Spacing'), num(v.n, 'Studs')), 2)} mm`]
	},
	{
		id: 'load-speed',
		title: 'Load index and speed symbol',
		fields: [
			{ name: 'li', label: 'Load index', value: '91' },
			{ name: 'ss', label: 'Speed symbol', value: 'H' }
		],
		compute: (v) => {
			const li = num(v.li, 'Load index');
			return [
				`${loadIndexToKg(li)} kg (${loadIndexToLb(li)} lb) per tire`,
				`${speedSymbolToKmh(v.ss.trim())} km/h (${speedSymbolToMph(v.ss.trim())} mph)`
			];
		}
	},
	{
		id: 'tire-age',
		title: 'Tire age from the DOT date code',
		fields: [{ name: 'code', label: 'DOT code or its last four digits', value: '0109' }],
		compute: (v) => {
			const d = parseDotDate(v.code);
			return [
				`week ${d.week} of ${d.year}, from ${d.weekStart.toISOString().slice(0, 10)}`,
				`up to ${f(d.ageYears, 1)} years old`
			];
		}
	},
	{
		id: 'pacing',
		title: 'Pace against the target',
		fields: [
			{ name: 'min', label: 'Minutes since starting', value: '60' },
			{ name: 'done', label: 'Wheels done', value: '4' },
			{ name: 'total', label: 'Wheels in all', value: '8' },
			{ name: 'target', label: 'Target min/wheel', value: '12' }
		],
		compute: (v) => {
			const now = new Date();
			const p = pace({
				startedAt: new Date(now.getTime() - num(v.min, 'Minutes') * 60_000),
				now,
				wheelsDone: num(v.done, 'Wheels done'),
				wheelsTotal: num(v.total, 'Wheels in all'),
				targetMinPerWheel: num(v.target, 'Target')
			});
			const ahead = Math.round(p.aheadMin);
			return [
				ahead >= 0 ? `${ahead} min ahead of target` : `${-ahead} min behind target`,
				`${f(p.expectedDone, 1)} wheels expected by now`
			];
		}
	}
];

/** The answer lines, or the reason there is none. */
export function answer(c: Calculator, values: Record<string, string>): { lines: string[] } | { error: string } {
	try {
		return { lines: c.compute(values) };
	} catch (e) {
		return { error: e instanceof Error ? e.message : String(e) };
	}
}
