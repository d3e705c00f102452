import { redirect } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { homesFor } from '@/lib/homes';

/** Everyone lands on the home of their first role; the header links to the others. */
export default async function Home() {
  const actor = await authorizePage();
  const homes = homesFor(actor);
  redirect(homes[0]?.href ?? '/no-role');
}
