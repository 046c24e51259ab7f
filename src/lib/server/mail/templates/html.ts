/**
 * HTML for e-mail, escaped by construction: the `html` tag escapes every
 * interpolated value unless it is already SafeHtml (the result of another
 * `html` tag), so a vessel named `<script>` arrives as text, never as markup.
 */
export class SafeHtml {
	constructor(readonly value: string) {}
	toString() {
		return this.value;
	}
}

const ENTITIES: Record<string, string> = {
	'&': '&amp;',
	'<': '&lt;',
	'>': '&gt;',
	'"': '&quot;',
	"'": '&#39;'
};

export function escapeHtml(text: string): string {
	return text.replace(/[&<>"']/g, (c) => ENTITIES[c]);
}

export type HtmlValue =
	SafeHtml | string | number | null | undefined | false | readonly HtmlValue[];

function render(value: HtmlValue): string {
	if (value === null || value === undefined || value === false) return '';
	if (value instanceof SafeHtml) return value.value;
	if (Array.isArray(value)) return value.map(render).join('');
	return escapeHtml(String(value));
}

export function html(strings: TemplateStringsArray, ...values: HtmlValue[]): SafeHtml {
	let out = strings[0];
	for (let i = 0; i < values.length; i++) out += render(values[i]) + strings[i + 1];
	return new SafeHtml(out);
}
