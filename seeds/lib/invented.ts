// Generators for invented data: vehicle makes and models with plausible wheel facts, customers, plates, VINs.
// Every make and model name here is coined for Lugline; none is a real maker's brand or model. The wheel facts follow
// the ranges the trade sees (stud counts, bolt circles, threads, torques, pressures) but describe no real vehicle,
// so every record carries a `source` that says it must not be used to service a car.
import type { Rng } from './prng';

export const DEMO_VEHICLE_SOURCE = 'Invented demo data (Lugline demo seed) - not for service use';
export const BENCH_VEHICLE_SOURCE = 'Invented benchmark data (Lugline bench seed) - not for service use';

// ---------------------------------------------------------------- vehicles

export type VehicleClass = 'compact' | 'sedan' | 'crossover' | 'suv' | 'sport' | 'truck' | 'heavy' | 'van';

export interface VehicleRecord {
	year_from: number;
	year_to: number;
	make: string;
	model: string;
	trim: string;
	stud_count: number;
	bolt_circle_mm: number;
	centre_bore_mm: number;
	thread: string;
	hex_mm: number;
	torque_nm: number;
	tire_front: string;
	tire_rear: string;
	placard_front_kpa: number;
	placard_rear_kpa: number;
	tpms: 'direct' | 'indirect' | 'none';
	notes: string;
	source: string;
}

interface ClassFacts {
	/** [stud count, bolt circle mm, centre bores that go with it] */
	patterns: readonly (readonly [number, number, readonly number[]])[];
	threads: readonly string[];
	hex: readonly number[];
	torque: readonly [number, number];
	/** OE sizes from the smallest wheel up, as [front, rear]; trims further up the list get bigger wheels. */
	sizes: readonly (readonly [string, string])[];
	trims: readonly string[];
	placardFront: readonly [number, number];
	/** Added to the front placard for the rear axle. */
	rearOffset: readonly [number, number];
	notes: readonly string[];
}

const CLASSES: Record<VehicleClass, ClassFacts> = {
	compact: {
		patterns: [
			[4, 100, [54.1, 56.1, 57.1, 60.1]],
			[4, 108, [63.4, 65.1]],
			[5, 100, [54.1, 56.1, 57.1]],
			[5, 114.3, [60.1, 64.1, 67.1]]
		],
		threads: ['M12x1.5', 'M12x1.25'],
		hex: [17, 19, 21],
		torque: [80, 110],
		sizes: [
			['185/65R15 88H', '185/65R15 88H'],
			['195/65R15 91H', '195/65R15 91H'],
			['205/55R16 91V', '205/55R16 91V'],
			['215/45R17 87W', '215/45R17 87W']
		],
		trims: ['', 'Hatch', 'Plus', 'Sport'],
		placardFront: [220, 240],
		rearOffset: [-10, 0],
		notes: ['', '', '', 'Steel wheels on the base trim take conical-seat nuts; alloys take the longer nut.']
	},
	sedan: {
		patterns: [
			[5, 114.3, [60.1, 64.1, 66.1, 67.1, 70.3]],
			[5, 112, [57.1, 66.5]],
			[5, 108, [63.4, 65.1]],
			[5, 120, [72.6]]
		],
		threads: ['M12x1.5', 'M14x1.5', '1/2-20'],
		hex: [19, 21],
		torque: [100, 140],
		sizes: [
			['215/60R16 95H', '215/60R16 95H'],
			['215/55R17 94V', '215/55R17 94V'],
			['225/50R17 94V', '225/50R17 94V'],
			['235/45R18 94V', '235/45R18 94V']
		],
		trims: ['', 'Plus', 'AWD', 'Touring'],
		placardFront: [230, 250],
		rearOffset: [-10, 0],
		notes: ['', '', '', 'Hub-centric: clean the hub face before the wheel goes on.']
	},
	crossover: {
		patterns: [
			[5, 114.3, [60.1, 64.1, 67.1]],
			[5, 108, [63.4]],
			[5, 112, [57.1, 66.5]],
			[5, 120, [64.1, 72.6]]
		],
		threads: ['M12x1.5', 'M14x1.5'],
		hex: [19, 21],
		torque: [110, 150],
		sizes: [
			['225/65R17 102H', '225/65R17 102H'],
			['235/65R17 104H', '235/65R17 104H'],
			['235/60R18 103H', '235/60R18 103H'],
			['235/55R19 101V', '235/55R19 101V']
		],
		trims: ['FWD', 'AWD', 'AWD Trail'],
		placardFront: [230, 250],
		rearOffset: [0, 0],
		notes: ['', '', 'Locking nut on each wheel from the factory: ask for the key at the counter.']
	},
	suv: {
		patterns: [
			[5, 120, [72.6, 74.1]],
			[6, 139.7, [78.1, 95.1, 106.1]],
			[5, 127, [71.5]],
			[6, 114.3, [66.1]]
		],
		threads: ['M14x1.5', '1/2-20'],
		hex: [21, 22],
		torque: [130, 190],
		sizes: [
			['265/70R17 115T', '265/70R17 115T'],
			['255/65R18 111T', '255/65R18 111T'],
			['265/60R18 110H', '265/60R18 110H'],
			['275/55R20 113T', '275/55R20 113T']
		],
		trims: ['4x4', '4x4 Long', 'Trail'],
		placardFront: [240, 260],
		rearOffset: [0, 10],
		notes: ['', '', 'Full-size spare under the floor: include it when the customer asks for a five-wheel rotation.']
	},
	sport: {
		patterns: [
			[5, 114.3, [64.1, 70.3]],
			[5, 120, [72.6]],
			[5, 112, [66.5]]
		],
		threads: ['M12x1.5', 'M14x1.5'],
		hex: [17, 19, 21],
		torque: [110, 150],
		sizes: [
			['225/40R18 92Y', '255/35R18 94Y'],
			['245/40R19 98Y', '275/35R19 100Y'],
			['255/35R20 97Y', '285/30R20 99Y']
		],
		trims: ['', 'Track'],
		placardFront: [220, 250],
		rearOffset: [0, 20],
		notes: [
			'Staggered fitment: rotate side to side only, never front to rear.',
			'Run-flat OE tires: mount on a machine set up for run-flats.'
		]
	},
	truck: {
		patterns: [
			[6, 139.7, [78.1, 106.1]],
			[6, 135, [87.1]],
			[5, 139.7, [77.8]],
			[6, 120, [67.1]]
		],
		threads: ['M14x1.5', 'M14x2.0', '9/16-18', '1/2-20'],
		hex: [21, 22],
		torque: [150, 190],
		sizes: [
			['265/70R17 115T', '265/70R17 115T'],
			['255/70R18 113T', '255/70R18 113T'],
			['275/65R18 116T', '275/65R18 116T'],
			['275/60R20 115S', '275/60R20 115S']
		],
		trims: ['Regular cab 4x2', 'Crew 4x4', 'Extended cab 4x4'],
		placardFront: [240, 280],
		rearOffset: [0, 0],
		notes: ['', '', 'Two-piece capped lug nuts: replace any with a swollen cap rather than hammering a socket on.']
	},
	heavy: {
		patterns: [
			[8, 165.1, [116.7, 121.3, 124.1]],
			[8, 170, [125]],
			[8, 180, [124.1]]
		],
		threads: ['9/16-18', 'M14x1.5', 'M14x2.0'],
		hex: [21, 22],
		torque: [190, 220],
		sizes: [
			['LT245/75R17 121/118S', 'LT245/75R17 121/118S'],
			['LT265/70R17 121/118S', 'LT265/70R17 121/118S'],
			['LT275/70R18 125/122S', 'LT275/70R18 125/122S'],
			['LT275/65R20 126/123S', 'LT275/65R20 126/123S']
		],
		trims: ['3/4-ton Crew 4x4', '1-ton Single rear', 'Cab and chassis'],
		placardFront: [380, 450],
		rearOffset: [60, 100],
		notes: [
			'Re-torque after the first 50-100 km is part of the job on these.',
			'',
			'Full-size spare under the bed: winch cable often seized.'
		]
	},
	van: {
		patterns: [
			[5, 120, [65.1]],
			[6, 130, [84.1]],
			[5, 160, [65.1]],
			[6, 139.7, [100.1]]
		],
		threads: ['M14x1.5', 'M14x2.0', '9/16-18'],
		hex: [19, 21, 22],
		torque: [160, 190],
		sizes: [
			['LT225/75R16 115/112R', 'LT225/75R16 115/112R'],
			['215/65R16C 109/107T', '215/65R16C 109/107T'],
			['LT245/75R16 120/116Q', 'LT245/75R16 120/116Q'],
			['235/65R16C 121/119R', '235/65R16C 121/119R']
		],
		trims: ['Cargo', 'Passenger', 'High roof'],
		placardFront: [350, 450],
		rearOffset: [30, 100],
		notes: ['', 'Rear pressure depends on load: the placard value is for a full load.']
	}
};

interface MakeSpec {
	make: string;
	models: readonly (readonly [string, VehicleClass])[];
}

// Coined names, one maker per line. Checked against the brands and model names the trade sees every day.
// prettier-ignore
const DEMO_MAKES: readonly MakeSpec[] = [
	{ make: 'Arvessa', models: [['Lira', 'compact'], ['Sesto', 'sedan'], ['Mivel', 'crossover'], ['Orta', 'compact']] },
	{ make: 'Brennholt', models: [['Tamber', 'truck'], ['Grist', 'heavy'], ['Kolvar', 'suv'], ['Skerry', 'truck']] },
	{ make: 'Corvane', models: [['Ivra', 'sedan'], ['Selka', 'sport'], ['Vanto', 'sedan'], ['Pell', 'compact']] },
	{ make: 'Dunmark', models: [['Moorlan', 'suv'], ['Cairnet', 'crossover'], ['Tollan', 'crossover'], ['Brae', 'suv']] },
	{ make: 'Estrelle', models: [['Nima', 'compact'], ['Solenne', 'crossover'], ['Pica', 'compact'], ['Avel', 'sedan']] },
	{ make: 'Feldmoor', models: [['Harro', 'truck'], ['Plowden', 'van'], ['Wend', 'truck'], ['Cartwell', 'van']] },
	{ make: 'Garrow', models: [['Stoutley', 'heavy'], ['Drovan', 'van'], ['Tallis', 'heavy']] },
	{ make: 'Haverly', models: [['Quillet', 'sedan'], ['Marten', 'sport'], ['Esk', 'sedan'], ['Lowrie', 'crossover']] },
	{ make: 'Isenmark', models: [['Torva', 'crossover'], ['Fjelde', 'suv'], ['Ister', 'suv'], ['Runa', 'crossover']] },
	{ make: 'Kettleby', models: [['Pip', 'compact'], ['Tansy', 'compact'], ['Wicker', 'van'], ['Nook', 'compact']] },
	{ make: 'Lundmere', models: [['Orrin', 'sedan'], ['Saltby', 'crossover'], ['Vessey', 'suv'], ['Lathe', 'sedan']] },
	{ make: 'Marrick', models: [['Vireo', 'sport'], ['Ternby', 'sedan'], ['Kesh', 'sport']] },
	{ make: 'Norvale', models: [['Hollin', 'truck'], ['Scarp', 'suv'], ['Fallow', 'heavy'], ['Brackley', 'truck']] },
	{ make: 'Ostrand', models: [['Oria', 'crossover'], ['Tresk', 'van'], ['Halde', 'crossover'], ['Vimmer', 'compact']] }
];

// The bench needs thousands of names: coined from syllables, with a guard against landing on a real name by chance.
// prettier-ignore
const MAKE_HEADS = [
	'Al', 'Bren', 'Cald', 'Dor', 'Ev', 'Fal', 'Gan', 'Hes', 'Ist', 'Jor', 'Kel', 'Lom', 'Mer', 'Nor', 'Ol', 'Pren',
	'Quen', 'Rav', 'Sil', 'Tor', 'Ul', 'Vend', 'Wex', 'Yarn'
];
// prettier-ignore
const MAKE_TAILS = [
	'vessa', 'mark', 'holt', 'dale', 'rick', 'stead', 'wyn', 'mere', 'by', 'ard', 'ova', 'ence', 'worth', 'ley', 'ten',
	'aro'
];
const MODEL_HEADS = ['Ka', 'Ve', 'Lo', 'Tri', 'Mo', 'Sa', 'Ne', 'Ri', 'Da', 'Fo', 'Gu', 'Pe', 'Bo', 'Ze', 'Hu', 'Ta'];
const MODEL_TAILS = ['rel', 'lin', 'vel', 'ska', 'ren', 'mi', 'dor', 'lex', 'nia', 'bek', 'sta', 'vin', 'ral', 'ko'];
// prettier-ignore
const REAL_NAMES = new Set(
	[
		'kia', 'rio', 'nova', 'volvo', 'dart', 'neon', 'sonic', 'fusion', 'focus', 'mira', 'mirai', 'leaf', 'saab', 'lada',
		'seat', 'tesla', 'polo', 'golf', 'ka', 'zest', 'luna', 'tata', 'vento', 'soul', 'ray', 'move', 'rush', 'note',
		'kona', 'nio', 'lancia', 'dacia', 'opel', 'proton', 'geely', 'holden', 'moskvich', 'pontiac', 'saturn', 'scion',
		'smart', 'lotus', 'genesis', 'morris', 'austin', 'rover', 'talbot', 'simca', 'borgward', 'wartburg', 'trabant',
		'tatra', 'skoda', 'lincoln', 'mercury',
		// other makers' trademarks and plain words the syllables happen to spell
		'vesta', 'kelley', 'molex', 'bolex', 'kalex', 'dako', 'boral', 'fodor', 'sako', 'moral', 'alley', 'karen'
	].map((n) => n.toLowerCase())
);

function fact(rng: Rng, values: readonly number[]): number {
	return rng.pick(values);
}

function roundTo(value: number, step: number): number {
	return Math.round(value / step) * step;
}

/** The generations and trims of one model: a year range per generation, wheel facts shared across its trims. */
function inventModel(
	rng: Rng,
	make: string,
	model: string,
	cls: VehicleClass,
	source: string,
	maxGenerations: number
): VehicleRecord[] {
	const facts = CLASSES[cls];
	const records: VehicleRecord[] = [];
	let year = rng.int(1999, 2013);
	let pattern = rng.pick(facts.patterns);
	let bore = fact(rng, pattern[2]);
	let thread = rng.pick(facts.threads);
	const hex = fact(rng, facts.hex);
	let torque = roundTo(rng.between(facts.torque[0], facts.torque[1]), 5);
	let sizeBase = 0;
	const generations = rng.int(Math.min(2, maxGenerations), maxGenerations);
	for (let g = 0; g < generations && year <= 2025; g++) {
		const yearTo = Math.min(year + rng.int(4, 7) - 1, 2026);
		if (g > 0 && rng.chance(0.25)) {
			// A new platform now and then brings a new bolt pattern and thread with it.
			pattern = rng.pick(facts.patterns);
			bore = fact(rng, pattern[2]);
			thread = rng.pick(facts.threads);
			torque = roundTo(rng.between(facts.torque[0], facts.torque[1]), 5);
		}
		const front = roundTo(rng.between(facts.placardFront[0], facts.placardFront[1]), 10);
		const rear = Math.min(roundTo(front + rng.between(facts.rearOffset[0], facts.rearOffset[1]), 10), 550);
		const tpms: VehicleRecord['tpms'] =
			year >= 2008
				? rng.chance(cls === 'heavy' || cls === 'truck' ? 0.9 : 0.7)
					? 'direct'
					: 'indirect'
				: rng.chance(0.2)
					? 'direct'
					: 'none';
		const trimCount = rng.int(1, Math.min(3, facts.trims.length));
		const trimStart = rng.int(0, facts.trims.length - trimCount);
		for (let t = 0; t < trimCount; t++) {
			const size = facts.sizes[Math.min(sizeBase + t, facts.sizes.length - 1)];
			records.push({
				year_from: year,
				year_to: yearTo,
				make,
				model,
				trim: facts.trims[trimStart + t],
				stud_count: pattern[0],
				bolt_circle_mm: pattern[1],
				centre_bore_mm: bore,
				thread,
				hex_mm: hex,
				torque_nm: torque,
				tire_front: size[0],
				tire_rear: size[1],
				placard_front_kpa: front,
				placard_rear_kpa: rear,
				tpms,
				notes: rng.pick(facts.notes),
				source
			});
		}
		// Later generations tend to ride on bigger wheels.
		if (rng.chance(0.5)) sizeBase = Math.min(sizeBase + 1, facts.sizes.length - 1);
		year = yearTo + 1;
	}
	return records;
}

/** About 300 records from the hand-named demo makers. */
export function demoVehicles(rng: Rng): VehicleRecord[] {
	const out: VehicleRecord[] = [];
	for (const { make, models } of DEMO_MAKES) {
		for (const [model, cls] of models)
			out.push(...inventModel(rng.fork(`${make} ${model}`), make, model, cls, DEMO_VEHICLE_SOURCE, 4));
	}
	return out;
}

const CLASS_LIST = Object.keys(CLASSES) as VehicleClass[];

/** At least `count` distinct records from syllable-built makers, for the benchmark. */
export function benchVehicles(rng: Rng, count: number): VehicleRecord[] {
	const out: VehicleRecord[] = [];
	const makes = rng
		.shuffle(MAKE_HEADS.flatMap((h) => MAKE_TAILS.map((t) => h + t)))
		.filter((m) => !REAL_NAMES.has(m.toLowerCase()));
	const models = MODEL_HEADS.flatMap((h) => MODEL_TAILS.map((t) => h + t)).filter(
		(m) => !REAL_NAMES.has(m.toLowerCase())
	);
	for (const make of makes) {
		if (out.length >= count) break;
		const modelCount = rng.int(10, 16);
		const picked = rng.shuffle([...models]).slice(0, modelCount);
		for (const model of picked)
			out.push(...inventModel(rng, make, model, rng.pick(CLASS_LIST), BENCH_VEHICLE_SOURCE, 5));
	}
	if (out.length < count)
		throw new RangeError(`the name lists give only ${out.length} bench vehicles; ${count} were asked for`);
	return out;
}

/** LT sizes and European commercial (C) sizes carry the higher pressures and deeper new tread of light trucks. */
export function isLightTruckSize(size: string): boolean {
	return size.startsWith('LT') || /R\d+C\b/.test(size);
}

/** The natural key the vehicles table is unique on. */
export function vehicleKey(v: Pick<VehicleRecord, 'make' | 'model' | 'trim' | 'year_from' | 'year_to'>): string {
	return `${v.make}|${v.model}|${v.trim}|${v.year_from}|${v.year_to}`;
}

// ---------------------------------------------------------------- people

// prettier-ignore
const FIRST_NAMES = [
	'Ada', 'Amir', 'Anneli', 'Bao', 'Bettina', 'Calder', 'Carmen', 'Dafne', 'Declan', 'Edda', 'Emeka', 'Farah', 'Felix',
	'Gaia', 'Gideon', 'Hana', 'Hugo', 'Idris', 'Ines', 'Jonas', 'Kaia', 'Kenji', 'Leona', 'Luca', 'Maeve', 'Malik',
	'Mira', 'Nadia', 'Nils', 'Noor', 'Odile', 'Omar', 'Petra', 'Quentin', 'Rafael', 'Rosa', 'Sami', 'Signe', 'Soren',
	'Talia', 'Theo', 'Una', 'Valter', 'Vera', 'Wren', 'Xavi', 'Yara', 'Yusuf', 'Zofia', 'Anton', 'Bryn', 'Cleo',
	'Dmitri', 'Esme', 'Freya', 'Gus', 'Halle', 'Ivo', 'Jora', 'Kofi', 'Lise', 'Matteo', 'Nell', 'Otto', 'Pia', 'Reuben',
	'Saoirse', 'Tomas', 'Ulla', 'Vikram'
];
// prettier-ignore
const SURNAME_HEADS = [
	'Ash', 'Bar', 'Brook', 'Cald', 'Dun', 'Eld', 'Fair', 'Gold', 'Hart', 'Ing', 'Kerr', 'Lang', 'Mar', 'North', 'Oak',
	'Pem', 'Quin', 'Rad', 'Stan', 'Thorn', 'Wester', 'Yar', 'Hol', 'Mill'
];
// prettier-ignore
const SURNAME_TAILS = [
	'by', 'well', 'wick', 'ton', 'son', 'ley', 'more', 'ridge', 'field', 'holm', 'gate', 'stead', 'wood', 'den', 'ham',
	'croft'
];

export function inventName(rng: Rng): { first: string; last: string } {
	return { first: rng.pick(FIRST_NAMES), last: rng.pick(SURNAME_HEADS) + rng.pick(SURNAME_TAILS) };
}

// North American numbers 555-0100 to 555-0199 are set aside for fiction in every area code.
// prettier-ignore
const AREA_CODES = [
	'204', '431', '306', '639', '807', '705', '249', '519', '226', '548', '343', '613', '403', '587', '780', '825',
	'250', '778', '236', '672', '867', '902', '782', '506'
];

/** Distinct fictional numbers while they last (2,400), then repeats, as a big store would see for shared phones. */
export function fictionalPhones(rng: Rng): (i: number) => string {
	const pool = rng.shuffle(
		AREA_CODES.flatMap((area) => Array.from({ length: 100 }, (_, n) => `${area}-555-01${String(n).padStart(2, '0')}`))
	);
	return (i) => pool[i % pool.length];
}

const PLATE_LETTERS = 'ABCDEFGHJKLMNPRSTUVWXYZ';
const VIN_CHARS = 'ABCDEFGHJKLMNPRSTUVWXYZ0123456789';

/** Plates of the form `ABC 123`, never repeated within one `used` set. */
export function inventPlate(rng: Rng, used: Set<string>): string {
	for (;;) {
		let plate = '';
		for (let i = 0; i < 3; i++) plate += PLATE_LETTERS[rng.int(0, PLATE_LETTERS.length - 1)];
		plate += ` ${String(rng.int(0, 999)).padStart(3, '0')}`;
		if (!used.has(plate)) {
			used.add(plate);
			return plate;
		}
	}
}

/** 17 characters without I, O or Q, as the VIN check in the schema wants; not a decodable VIN. */
export function inventVin(rng: Rng): string {
	let vin = '';
	for (let i = 0; i < 17; i++) vin += VIN_CHARS[rng.int(0, VIN_CHARS.length - 1)];
	return vin;
}

// prettier-ignore
const COLOURS: readonly (readonly [string, number])[] = [
	['white', 24], ['black', 18], ['grey', 16], ['silver', 12], ['blue', 9], ['red', 8], ['green', 3], ['brown', 2],
	['beige', 2], ['orange', 1], ['yellow', 1], ['burgundy', 2]
];

// prettier-ignore
const CUSTOMER_NOTES = [
	'', '', '', '', '', '', '', '', '', '', 'Prefers a call, not e-mail.', 'Fleet account: invoice monthly.',
	'Keeps a wheel-lock key in the glovebox.', 'Stores a winter set with us.',
	'Hard of hearing: speak up at the counter.'
];

export interface InventedCustomerVehicle {
	plate: string;
	vin: string;
	colour: string;
	odometer_km: number | null;
	/** Index into the caller's vehicle list. */
	vehicleIndex: number;
}

export interface InventedCustomer {
	name: string;
	phone: string;
	email: string;
	notify_email: boolean;
	notes: string;
	vehicles: InventedCustomerVehicle[];
}

/** Customers with one or two vehicles each. E-mail addresses are on example.test, which never delivers. */
export function inventCustomers(rng: Rng, count: number, vehicleCount: number): InventedCustomer[] {
	const phone = fictionalPhones(rng.fork('phones'));
	const plates = new Set<string>();
	const out: InventedCustomer[] = [];
	for (let i = 0; i < count; i++) {
		const { first, last } = inventName(rng);
		const hasEmail = rng.chance(0.65);
		const email = hasEmail ? `${first}.${last}.${i + 1}@example.test`.toLowerCase() : '';
		const vehicles: InventedCustomerVehicle[] = [];
		const n = rng.chance(0.3) ? 2 : 1;
		for (let v = 0; v < n; v++) {
			vehicles.push({
				plate: inventPlate(rng, plates),
				vin: rng.chance(0.6) ? inventVin(rng) : '',
				colour: rng.weighted(COLOURS),
				odometer_km: rng.chance(0.9) ? roundTo(rng.int(3_000, 290_000), 10) : null,
				vehicleIndex: rng.int(0, vehicleCount - 1)
			});
		}
		out.push({
			name: `${first} ${last}`,
			phone: phone(i),
			email,
			notify_email: hasEmail && rng.chance(0.55),
			notes: rng.pick(CUSTOMER_NOTES),
			vehicles
		});
	}
	return out;
}

// ---------------------------------------------------------------- tires

const TIN_CHARS = 'ABCDEFHJKLMNPRTUVWXY0123456789';

/** A tire identification number with an invented plant and size code and a real-looking week/year date code. */
export function inventDotCode(rng: Rng, year: number, week: number): string {
	const part = (n: number) => Array.from({ length: n }, () => TIN_CHARS[rng.int(0, TIN_CHARS.length - 1)]).join('');
	return `DOT ${part(2)} ${part(2)} ${part(4)} ${String(week).padStart(2, '0')}${String(year % 100).padStart(2, '0')}`;
}
