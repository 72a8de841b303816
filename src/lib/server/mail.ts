import nodemailer, { type Transporter } from 'nodemailer';

let transport: Transporter | undefined;

function transporter(): Transporter {
	if (transport) return transport;
	const url = process.env.SMTP_URL;
	if (!url) throw new Error('SMTP_URL is not set and no local mail catcher was started.');
	transport = nodemailer.createTransport(url);
	return transport;
}

export interface Message {
	to: string;
	subject: string;
	text: string;
	html?: string;
}

export async function sendMail(message: Message) {
	const from = process.env.MAIL_FROM ?? 'Stipple <no-reply@stipple.local>';
	await transporter().sendMail({ from, ...message });
}

export function closeMail() {
	transport?.close();
	transport = undefined;
}

/** Plain, escaped HTML around a paragraph and one button-like link. */
export function linkMail(intro: string, label: string, url: string, outro: string) {
	const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
	return {
		text: `${intro}\n\n${label}: ${url}\n\n${outro}\n`,
		html: `<p>${esc(intro)}</p><p><a href="${esc(url)}">${esc(label)}</a></p><p>${esc(outro)}</p>`
	};
}
