/** Numbers always carry units. */
export const metres = (m: number): string => (m >= 10_000 ? `${(m / 1000).toFixed(2)} km` : `${Math.round(m).toLocaleString()} m`);
export const minutes = (min: number): string => (min >= 90 ? `${Math.floor(min / 60)} h ${Math.round(min % 60)} min` : `${Math.round(min)} min`);
export const percent = (p: number): string => `${p.toFixed(1)} %`;
