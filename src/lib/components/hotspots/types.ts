/** What the Hot spots page receives (the shapes of densityOf and zonesOf, the fields it shows). */
export interface ZoneRow {
	id: string;
	count: number;
	rate: number;
	expected: number;
	residual: number;
	share: number;
	rank: number;
}

export interface Ranking {
	zones: ZoneRow[];
	total: number;
	units: number;
	test: { statistic: number; df: number; p: number; smallExpected: boolean };
	verdict: { verdict: string; text: string; caveat: string };
}

export interface ClarkEvans {
	n: number;
	ratio: number;
	z: number;
	p: number;
	verdict: 'clustered' | 'regular' | 'random';
}
