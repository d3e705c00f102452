'use client';
/**
 * Registrations of learning platforms, their course connections, and Oscillab's own keys. Each part is
 * its own component in this folder; the registration form's state lives here because the list's Edit
 * fills it and the list's Remove and Switch report under it.
 */
import type { RegistrationView } from '@/lib/lti/admin';
import { RegisteredPlatforms } from './platforms';
import { RegistrationForm, useRegistrationForm } from './registration-form';
import { SigningKeys } from './signing-keys';
import type { Cohort, Course, Key } from './shared';

export function RegistrationsAdmin({
  registrations,
  keys,
  courses,
  cohorts,
}: {
  registrations: RegistrationView[];
  keys: Key[];
  courses: Course[];
  cohorts: Cohort[];
}) {
  const form = useRegistrationForm();
  return (
    <div className="space-y-6">
      <RegisteredPlatforms registrations={registrations} courses={courses} cohorts={cohorts} onEdit={form.edit} onMessage={form.setMsg} />
      <RegistrationForm state={form} />
      <SigningKeys keys={keys} />
    </div>
  );
}
