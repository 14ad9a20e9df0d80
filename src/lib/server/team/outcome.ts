// What a team change returns: done, or a sentence and the HTTP status the route answers with.
// 404 when the member or invitation is not this farm's (the same as not existing, so a manager
// of another farm learns nothing), 409 when the farm's state forbids it, 400 for bad input.
export type Problem = { ok: false; status: 400 | 404 | 409 | 429; message: string };
export type Outcome<T extends object = object> = ({ ok: true } & T) | Problem;

export const problem = (status: Problem['status'], message: string): Problem => ({ ok: false, status, message });

/** The part of a guard Actor these functions need: who acts, in which farm. */
export type TeamActor = { user: { id: string; name: string }; farm: { id: string; slug: string; name: string } };
