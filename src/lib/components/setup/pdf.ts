/**
 * PDF drawings are rendered to an image in the browser with pdf.js; the server only ever sees
 * the image. Loaded on demand so the Setup page stays light until someone picks a PDF.
 */
const MAX_PAGES = 200;
const LONG_SIDE = 3000;

async function open(file: Blob) {
	const pdfjs = await import('pdfjs-dist');
	const worker = await import('pdfjs-dist/build/pdf.worker.min.mjs?url');
	pdfjs.GlobalWorkerOptions.workerSrc = worker.default;
	const doc = await pdfjs.getDocument({ data: new Uint8Array(await file.arrayBuffer()), isEvalSupported: false })
		.promise;
	if (doc.numPages > MAX_PAGES) {
		await doc.destroy();
		throw new Error(
			`This PDF has ${doc.numPages.toLocaleString('en-GB')} pages; Stipple takes drawings of up to ${MAX_PAGES} pages.`
		);
	}
	return doc;
}

export async function pdfPageCount(file: Blob): Promise<number> {
	const doc = await open(file);
	const n = doc.numPages;
	await doc.destroy();
	return n;
}

/** Renders one page (1-based) on white, longest side 3000 px, as a PNG. */
export async function renderPdfPage(file: Blob, pageNumber: number): Promise<Blob> {
	const doc = await open(file);
	try {
		const page = await doc.getPage(pageNumber);
		const base = page.getViewport({ scale: 1 });
		const viewport = page.getViewport({ scale: LONG_SIDE / Math.max(base.width, base.height) });
		const canvas = document.createElement('canvas');
		canvas.width = Math.round(viewport.width);
		canvas.height = Math.round(viewport.height);
		const context = canvas.getContext('2d');
		if (!context) throw new Error('This browser cannot draw the PDF.');
		context.fillStyle = '#ffffff';
		context.fillRect(0, 0, canvas.width, canvas.height);
		await page.render({ canvas, canvasContext: context, viewport }).promise;
		return await new Promise<Blob>((resolve, reject) =>
			canvas.toBlob(
				(b) => (b ? resolve(b) : reject(new Error('The page could not be turned into an image.'))),
				'image/png'
			)
		);
	} finally {
		await doc.destroy();
	}
}
