// The vehicle data as screens receive it: the palette's compact entries and one record's wheel facts (SI units).

export interface VehicleEntry {
	id: number;
	label: string;
	sizes: string[];
}

/** One vehicle's wheel facts, stored in SI; screens show them in the store's units. */
export interface VehicleFacts {
	id: number;
	yearFrom: number;
	yearTo: number;
	make: string;
	model: string;
	trim: string;
	studCount: number;
	boltCircleMm: number;
	centreBoreMm: number;
	thread: string;
	hexMm: number;
	torqueNm: number;
	tireFront: string;
	tireRear: string;
	placardFrontKpa: number;
	placardRearKpa: number;
	tpms: string;
	notes: string;
	source: string;
}
