// Concrete addresses for the authorisation table's route ids (src/lib/server/authz.ts), shared by the role matrix
// (tests/e2e/role-matrix.test.ts) and the disabled-user and hostile-input checks (tests/reliability/).
/** Concrete addresses for route ids; ids with parameters need an example here or the test fails. */
export const examples: Record<string, string> = {
	// Demo job 1 and wheel 1 exist in the seeded store of every role in this matrix.
	'/api/jobs/[id=id]': '/api/jobs/1',
	// Roles allowed get 202 (a summary queued for the tests' mail catcher) or 422 (job 1 not done, no address, or a
	// summary already waiting); never 401/403.
	'/api/jobs/[id=id]/summary': '/api/jobs/1/summary',
	'/api/wheels/[id=id]': '/api/wheels/1',
	'/api/vehicles/[id=id]': '/api/vehicles/1',
	'/api/wheels/[id=id]/record': '/api/wheels/1/record',
	// Roles allowed get 415 (the matrix posts JSON, not a photo); the demo store has no photos, so photo 1 is a 404.
	'/api/wheels/[id=id]/photos': '/api/wheels/1/photos',
	'/api/photos/[id=id]': '/api/photos/1',
	'/api/bays/[code=code]/claim': '/api/bays/B1/claim',
	'/(staff)/bay/[code=code]': '/bay/B1',
	// Vehicle 1 is the seed's first record; a manager's empty save is refused (400) and changes nothing.
	'/(staff)/manage/vehicles/[id=id]': '/manage/vehicles/1',
	// A manager gets the day's throughput as CSV (200).
	'/api/reports/[name]': '/api/reports/throughput?from=2026-12-01&to=2026-12-02'
};

export function urlFor(routeId: string): string {
	if (examples[routeId]) return examples[routeId];
	if (routeId.includes('[')) throw new Error(`add an example address for ${routeId} to tests/support/routes.ts`);
	return routeId.replace(/\/\([^)]+\)/g, '') || '/';
}
