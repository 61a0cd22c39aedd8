// How the manager's forms submit: the typed values stay after a refusal (so they can be corrected), secrets are
// cleared after a save, and the page's data is read again either way, so a refusal for a stale version shows what
// is stored now.
import type { SubmitFunction } from '@sveltejs/kit';
import { invalidateAll } from '$app/navigation';

export const submit: SubmitFunction = ({ formElement }) => {
	return async ({ result, update }) => {
		await update({ reset: false });
		if (result.type === 'success')
			for (const input of formElement.querySelectorAll<HTMLInputElement>('input[type="password"], input[name="pin"]'))
				input.value = '';
		if (result.type === 'failure') await invalidateAll();
	};
};
