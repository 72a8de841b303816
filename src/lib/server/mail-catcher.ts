/**
 * A local SMTP server for machines with no SMTP_URL: it accepts every message on 127.0.0.1
 * and keeps it in the caught_mail table, where admins read it on the Mailbox page and tests
 * read it too. Never used when real SMTP is configured.
 */
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { db } from './db';
import { caughtMail } from './db/schema';
import { desc, sql } from 'drizzle-orm';
import { freePort } from './db/local-cluster';

export interface MailCatcher {
	url: string;
	stop(): Promise<void>;
}

export async function startMailCatcher(): Promise<MailCatcher> {
	const server = new SMTPServer({
		authOptional: true,
		disabledCommands: ['STARTTLS', 'AUTH'],
		size: 5 * 1024 * 1024,
		logger: false,
		onData(stream, session, callback) {
			simpleParser(stream)
				.then(async (mail) => {
					const rcpt = session.envelope.rcptTo.map((r) => r.address);
					const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
					await db()
						.insert(caughtMail)
						.values({
							sender: from,
							recipients: rcpt,
							subject: mail.subject ?? '',
							text: mail.text ?? '',
							html: typeof mail.html === 'string' ? mail.html : null
						});
					callback();
				})
				.catch((err: Error) => callback(err));
		}
	});
	const port = await freePort();
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(port, '127.0.0.1', () => resolve());
	});
	return {
		url: `smtp://127.0.0.1:${port}`,
		stop: () => new Promise<void>((resolve) => server.close(() => resolve()))
	};
}

export function mailCatcherActive() {
	return process.env.STIPPLE_MAIL_CATCHER === '1';
}

/**
 * The newest mail to the people of one organisation (its members and those it invited). The catcher
 * holds every organisation's mail, reset links included: an admin sees only their own people's.
 */
export async function listCaughtMail(orgId: string, limit = 100) {
	return db()
		.select()
		.from(caughtMail)
		.where(
			sql`${caughtMail.recipients} && ARRAY(
				SELECT lower(u.email) FROM member m JOIN "user" u ON u.id = m.user_id WHERE m.organization_id = ${orgId}
				UNION SELECT lower(i.email) FROM invitation i WHERE i.organization_id = ${orgId})`
		)
		.orderBy(desc(caughtMail.receivedAt))
		.limit(limit);
}

/** The newest message to `address`, for tests and the Mailbox page. */
export async function latestMailTo(address: string) {
	const [row] = await db()
		.select()
		.from(caughtMail)
		.where(sql`${address.toLowerCase()} = ANY (${caughtMail.recipients})`)
		.orderBy(desc(caughtMail.receivedAt))
		.limit(1);
	return row ?? null;
}
