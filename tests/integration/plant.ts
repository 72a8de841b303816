/**
 * A made-up plant for integration tests: an admin with their organisation, one part with a Front
 * view on a small drawing with a zone grid, a two-cavity mould that makes it, a way to add defect
 * types, and a way to add members of any role.
 */
import { randomUUID } from 'node:crypto';
import type { MarkerColour, MarkerShape } from '../../src/lib/markers';
import type { Role } from '../../src/lib/roles';
import { createDefectType } from '../../src/lib/server/defects';
import { addRevision, createView, setGrid } from '../../src/lib/server/drawings';
import { createOrganisation } from '../../src/lib/server/orgs';
import { createPart } from '../../src/lib/server/parts';
import { acceptInvitation, invite } from '../../src/lib/server/team';
import { createTool } from '../../src/lib/server/tools';
import { good } from '../fixtures/images';
import { accessFor, newUser } from './helpers';

export interface PlantOptions {
	/** The part number, e.g. `R-${label}`. */
	partNumber: string;
	partName?: string;
	/** The Front view's zone grid. */
	grid?: { columns: number; rows: number };
	mould?: { code: string; name: string };
	adminName?: string;
}

export async function newPlant(label: string, o: PlantOptions) {
	const admin = await newUser(label, o.adminName);
	await createOrganisation(admin.caller, { name: `${label} Works` });
	const access = await accessFor(admin.headers);
	const part = await createPart(access, {
		number: o.partNumber,
		name: o.partName ?? 'Cover',
		material: '',
		process: '',
		notes: ''
	});
	const view = await createView(access, part.id, 'Front');
	const rev = await addRevision(access, view.id, await good.webp());
	await setGrid(access, rev.id, o.grid ?? { columns: 2, rows: 1 });
	const mould = await createTool(access, {
		code: o.mould?.code ?? 'M7',
		name: o.mould?.name ?? 'Cover mould',
		kind: 'mould',
		cavityCount: 2,
		partIds: [part.id]
	});
	/** A defect type for every part (colour, shape and severity only where a test cares). */
	const defectType = (
		code: string,
		name: string,
		look: { colour?: MarkerColour; shape?: MarkerShape; severity?: 'A' | 'B' | 'C' | 'D' } = {}
	) =>
		createDefectType(access, {
			code,
			name,
			description: '',
			colour: look.colour ?? 'sky',
			shape: look.shape ?? 'dot',
			severity: look.severity ?? 'C',
			allParts: true,
			partIds: []
		});
	/** A new member with `role`, invited by the admin and joined. */
	const member = async (role: Role) => {
		const u = await newUser(`${role}-${randomUUID().slice(0, 4)}`);
		const inv = await invite(access, admin.caller, { email: u.email, role });
		await acceptInvitation(u.caller, u.email, inv.id);
		return { email: u.email, user: u, access: await accessFor(u.headers) };
	};
	return { admin, access, part, view, rev, mould, defectType, member };
}
