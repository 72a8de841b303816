import type { Role } from './roles';

/** Stipple's screens, who sees each in the navigation, and what each is for. */
export interface Screen {
	path: string;
	label: string;
	blurb: string;
	roles: readonly Role[];
}

export const SCREENS: readonly Screen[] = [
	{
		path: '/bench',
		label: 'Bench',
		blurb: 'Pin every defect where it is on the part, unit by unit.',
		roles: ['inspector', 'engineer', 'admin']
	},
	{
		path: '/trends',
		label: 'Trends',
		blurb: 'Defects per unit against control limits, sample by sample.',
		roles: ['engineer', 'admin', 'toolmaker', 'viewer']
	},
	{
		path: '/hotspots',
		label: 'Hot spots',
		blurb: 'Where on the part the defects cluster.',
		roles: ['engineer', 'toolmaker', 'admin', 'viewer']
	},
	{
		path: '/repairs',
		label: 'Repairs',
		blurb: 'Tool repairs with their evidence, and whether they worked.',
		roles: ['toolmaker', 'engineer', 'admin', 'viewer']
	},
	{
		path: '/reports',
		label: 'Reports',
		blurb: 'One part over a period, on one page to print or send as a PDF.',
		roles: ['engineer', 'admin', 'toolmaker', 'viewer']
	},
	{
		path: '/signals',
		label: 'Signals',
		blurb: 'Out-of-control points waiting for a cause and an action.',
		roles: ['engineer', 'admin']
	},
	{
		path: '/setup',
		label: 'Setup',
		blurb: 'Parts, drawings, defect catalogue, tools, zones and sampling.',
		roles: ['engineer', 'admin', 'inspector', 'toolmaker', 'viewer']
	},
	{
		path: '/team',
		label: 'Team',
		blurb: 'Members, roles and invitations.',
		roles: ['admin']
	}
];

export function screensFor(role: Role | null): Screen[] {
	return role ? SCREENS.filter((s) => s.roles.includes(role)) : [];
}

export function screenAllowed(path: string, role: Role): boolean {
	const screen = SCREENS.find((s) => path === s.path || path.startsWith(`${s.path}/`));
	return !screen || screen.roles.includes(role);
}
