// A customer as the palette and intake receive them from GET /api/customers.

export interface CustomerHit {
	id: number;
	name: string;
	phone: string;
	email: string;
	vehicles: { id: number; plate: string; vehicleId: number | null; label: string | null }[];
	score: number;
}
