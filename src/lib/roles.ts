/** The five member roles of an organisation, shared by client and server. */
export const ROLES = ['admin', 'engineer', 'inspector', 'toolmaker', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABEL: Record<Role, string> = {
	admin: 'Admin',
	engineer: 'Process engineer',
	inspector: 'Inspector',
	toolmaker: 'Toolmaker',
	viewer: 'Viewer'
};

export const ROLE_HINT: Record<Role, string> = {
	admin: 'Runs the organisation: members, roles, invitations and settings.',
	engineer: 'Sets up parts and sampling, sets control limits, explains signals.',
	inspector: 'Takes samples at the line and pins every defect on the drawing.',
	toolmaker: 'Reviews hot spots of a die or mould and carries out repairs.',
	viewer: 'Reads charts, maps and reports; changes nothing.'
};

export function isRole(value: unknown): value is Role {
	return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}
