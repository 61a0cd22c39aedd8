// Drag and drop of wheels between the waiting line and the bays (HTML drag and drop). What is dragged is a list of
// wheel ids under our own media type, so a drop of anything else (text, a file) is ignored.
const TYPE = 'application/x-lugline-wheels';

export function carry(event: DragEvent, wheelIds: readonly number[]): void {
	if (!event.dataTransfer || wheelIds.length === 0) return event.preventDefault();
	event.stopPropagation();
	event.dataTransfer.setData(TYPE, JSON.stringify(wheelIds));
	event.dataTransfer.effectAllowed = 'move';
}

/** For `dragover`: lets the drop happen when wheels are being dragged. */
export function accept(event: DragEvent): void {
	if (!event.dataTransfer?.types.includes(TYPE)) return;
	event.preventDefault();
	event.dataTransfer.dropEffect = 'move';
}

/** For `drop`: the dragged wheel ids, or null when the drop carries something else. */
export function carried(event: DragEvent): number[] | null {
	const raw = event.dataTransfer?.getData(TYPE);
	if (!raw) return null;
	event.preventDefault();
	event.stopPropagation();
	try {
		const ids: unknown = JSON.parse(raw);
		return Array.isArray(ids) && ids.every((id) => Number.isSafeInteger(id) && id > 0) ? (ids as number[]) : null;
	} catch {
		return null;
	}
}
