/** A growable buffer of fixed-width numeric rows, taken as one Float64Array. */
export class RowBuffer {
	#data: Float64Array;
	#length = 0;
	constructor(
		readonly stride: number,
		initialRows = 1024
	) {
		this.#data = new Float64Array(stride * initialRows);
	}
	get rows() {
		return this.#length / this.stride;
	}
	push(...values: number[]) {
		if (this.#length + this.stride > this.#data.length) {
			const next = new Float64Array(this.#data.length * 2);
			next.set(this.#data);
			this.#data = next;
		}
		for (let i = 0; i < this.stride; i++) this.#data[this.#length++] = values[i];
	}
	take(): Float64Array {
		const out = this.#data.slice(0, this.#length);
		this.#length = 0;
		return out;
	}
}
