import { authorizePage } from '@/lib/authz';

export const metadata = { title: 'No course yet' };

export default async function NoRole() {
  const actor = await authorizePage();
  return (
    <div className="card mx-auto mt-10 max-w-lg">
      <h1 className="mb-2">Welcome, {actor.name}</h1>
      <p className="text-ink-soft">You are not enrolled in any course yet. Your instructor adds you when the term starts.</p>
    </div>
  );
}
