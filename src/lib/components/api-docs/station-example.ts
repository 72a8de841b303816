/** The worked example of a station posting a sample: a curl line and its body. */

/** Example ids: the sample's and the pins' are the station's own (UUIDv7); part and view come from Setup. */
export const STATION_BODY = {
	id: '0196a1f2-5b3c-7e41-8a2d-4c9e1f0b7d35',
	partId: '0195d0c4-2e6a-7b13-9f48-61a2c3d4e5f6',
	size: 5,
	pins: [
		{
			id: '0196a1f2-5b3d-7a02-b1c4-8e2f3a4b5c6d',
			unitIndex: 1,
			viewId: '0195d0c4-31aa-7c20-a5b6-7d8e9f0a1b2c',
			defectType: 'SK',
			x: 0.42,
			y: 0.61
		},
		{
			id: '0196a1f2-5b3d-7a03-91d7-2c4e6f8a0b1c',
			unitIndex: 3,
			viewId: '0195d0c4-31aa-7c20-a5b6-7d8e9f0a1b2c',
			defectType: 'FL',
			frame: { x: 812, y: 455 }
		}
	]
};

export function stationCurl(origin: string) {
	const body = JSON.stringify(STATION_BODY, null, 2).replace(/'/g, `'\\''`);
	return [
		`curl -X POST ${origin}/api/v1/station/samples \\`,
		`  -H 'Authorization: Bearer stk_…' \\`,
		`  -H 'Content-Type: application/json' \\`,
		`  -d '${body}'`
	].join('\n');
}
