/**
 * Shrinks a camera photo in the browser before it joins the outbox: a 12-megapixel original
 * would take minutes on the line's Wi-Fi, and the server keeps at most 1600 px anyway.
 * Anything the browser cannot read as an image goes as it is, for the server to refuse clearly.
 */
const LONG_SIDE = 2000;

export async function shrinkPhoto(file: Blob): Promise<Blob> {
	let bitmap: ImageBitmap;
	try {
		bitmap = await createImageBitmap(file, { imageOrientation: 'from-image' });
	} catch {
		return file;
	}
	const scale = Math.min(1, LONG_SIDE / Math.max(bitmap.width, bitmap.height));
	if (scale === 1 && file.type === 'image/jpeg') {
		bitmap.close();
		return file;
	}
	const canvas = document.createElement('canvas');
	canvas.width = Math.round(bitmap.width * scale);
	canvas.height = Math.round(bitmap.height * scale);
	canvas.getContext('2d')!.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
	bitmap.close();
	const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/jpeg', 0.85));
	return blob ?? file;
}
