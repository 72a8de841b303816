import { z } from 'zod';
import { ROLES } from '$lib/roles';
import { authId, email, text } from './common';

export const role = z.enum(ROLES, { error: `Role must be one of: ${ROLES.join(', ')}.` });

export const inviteSchema = z.object({ email, role });
export const changeRoleSchema = z.object({ role });
export const memberRefSchema = z.object({ memberId: authId });
export const changeRoleFormSchema = memberRefSchema.extend({ role });
export const invitationRefSchema = z.object({ invitationId: authId });

export const organisationSchema = z.object({ name: text(120, 'Organisation name') });
export const switchOrganisationSchema = z.object({ organizationId: authId });

export type InviteInput = z.infer<typeof inviteSchema>;
