import type { Actions, PageServerLoad } from './$types';
import { loadTokenPage, setPasswordAction } from '$lib/server/account/pages';

export const load: PageServerLoad = ({ params }) => loadTokenPage('invite', params.token);

export const actions: Actions = {
	default: (event) => setPasswordAction('invite', event)
};
