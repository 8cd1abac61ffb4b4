import type { UseFormRegisterReturn } from 'react-hook-form';

/** The question every password change asks: revoke the API tokens too? (Checked by default.) */
export function RevokeTokensChoice({ id, field }: { id: string; field: UseFormRegisterReturn }) {
  return (
    <label className="flex items-start gap-2 text-sm" htmlFor={id}>
      <input id={id} type="checkbox" className="mt-1" {...field} />
      <span>
        Also revoke my API tokens
        <span className="block text-xs text-ink-faint">Recommended if someone else may have known the password: a token keeps working after a password change. Scripts then need a new token.</span>
      </span>
    </label>
  );
}
