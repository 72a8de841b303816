/**
 * The Bench palette order after moving one type past its neighbour. Retired types are hidden from
 * the palette, so a move skips over them and they keep their places.
 */
export function moveInOrder(
	types: readonly { id: string; retired: boolean }[],
	id: string,
	direction: 'up' | 'down'
): string[] | null {
	const ids = types.map((t) => t.id);
	const from = ids.indexOf(id);
	if (from < 0 || types[from]!.retired) return null;
	const step = direction === 'up' ? -1 : 1;
	let to = from + step;
	while (to >= 0 && to < types.length && types[to]!.retired) to += step;
	if (to < 0 || to >= types.length) return null;
	[ids[from], ids[to]] = [ids[to]!, ids[from]!];
	return ids;
}
