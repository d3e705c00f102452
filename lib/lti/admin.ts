/** Registering learning platforms and connecting their courses (the site administrator's screen). */
import type { z } from 'zod';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http-error';
import { models } from '@/models';
import type { contextCreateSchema, registrationSchema, registrationUpdateSchema } from '@/lib/schemas/lti';
import { forgetPlatformKeys } from './platform-keys';

export type RegistrationView = {
  id: number;
  name: string;
  issuer: string;
  clientId: string;
  deploymentIds: string[];
  authLoginUrl: string;
  authTokenUrl: string;
  keySetUrl: string;
  tokenAudience: string | null;
  active: boolean;
  contexts: {
    id: number;
    contextId: string;
    title: string | null;
    courseId: number;
    courseCode: string;
    defaultCohortId: number | null;
    services: { roster: boolean; gradebook: boolean };
    rosterSyncedAt: string | null;
  }[];
};

export async function listRegistrations(): Promise<RegistrationView[]> {
  const { LtiRegistration, LtiDeployment, LtiContext, Course } = models();
  const [regs, deps, ctxs, courses] = await Promise.all([
    LtiRegistration.findAll({ order: [['id', 'ASC']] }),
    LtiDeployment.findAll({ order: [['id', 'ASC']] }),
    LtiContext.findAll({ order: [['id', 'ASC']] }),
    Course.findAll({ attributes: ['id', 'code'] }),
  ]);
  return regs.map((r) => ({
    id: r.id,
    name: r.name,
    issuer: r.issuer,
    clientId: r.clientId,
    authLoginUrl: r.authLoginUrl,
    authTokenUrl: r.authTokenUrl,
    keySetUrl: r.keySetUrl,
    tokenAudience: r.tokenAudience,
    active: r.active,
    deploymentIds: deps.filter((d) => d.registrationId === r.id).map((d) => d.deploymentId),
    contexts: ctxs
      .filter((c) => c.registrationId === r.id)
      .map((c) => ({
        id: c.id,
        contextId: c.contextId,
        title: c.title,
        courseId: c.courseId,
        courseCode: courses.find((x) => x.id === c.courseId)?.code ?? '?',
        defaultCohortId: c.defaultCohortId,
        services: { roster: Boolean(c.membershipsUrl), gradebook: Boolean(c.lineItemsUrl) },
        rosterSyncedAt: c.rosterSyncedAt?.toISOString() ?? null,
      })),
  }));
}

async function registrationOr404(id: number) {
  const row = await models().LtiRegistration.findByPk(id);
  if (!row) throw new HttpError(404, 'No such learning-platform registration.');
  return row;
}

export async function createRegistration(data: z.output<typeof registrationSchema>, actorId: number | null) {
  const { LtiRegistration, LtiDeployment } = models();
  return sequelize().transaction(async (t) => {
    if (await LtiRegistration.findOne({ where: { issuer: data.issuer, clientId: data.clientId }, transaction: t })) {
      throw new HttpError(409, 'This issuer and client id are already registered.');
    }
    const row = await LtiRegistration.create(
      {
        name: data.name,
        issuer: data.issuer,
        clientId: data.clientId,
        authLoginUrl: data.authLoginUrl,
        authTokenUrl: data.authTokenUrl,
        keySetUrl: data.keySetUrl,
        tokenAudience: data.tokenAudience || null,
        active: data.active ?? true,
      },
      { transaction: t },
    );
    for (const deploymentId of [...new Set(data.deploymentIds)])
      await LtiDeployment.create({ registrationId: row.id, deploymentId }, { transaction: t });
    await audit(
      { actorId, action: 'lti.registration.create', entityType: 'lti_registration', entityId: row.id, before: null, after: { ...data } },
      t,
    );
    return row;
  });
}

export async function updateRegistration(id: number, data: z.output<typeof registrationUpdateSchema>, actorId: number | null) {
  const { LtiRegistration, LtiDeployment } = models();
  const row = await registrationOr404(id);
  const before = row.toJSON();
  await sequelize().transaction(async (t) => {
    const issuer = data.issuer ?? row.issuer;
    const clientId = data.clientId ?? row.clientId;
    const clash = await LtiRegistration.findOne({ where: { issuer, clientId }, transaction: t });
    if (clash && clash.id !== id) throw new HttpError(409, 'Another registration has this issuer and client id.');
    const { deploymentIds, ...fields } = data;
    await LtiRegistration.update(
      { ...fields, ...(fields.tokenAudience !== undefined ? { tokenAudience: fields.tokenAudience || null } : {}) },
      { where: { id }, transaction: t },
    );
    if (deploymentIds) {
      const wanted = [...new Set(deploymentIds)];
      await LtiDeployment.destroy({ where: { registrationId: id }, transaction: t });
      for (const deploymentId of wanted) await LtiDeployment.create({ registrationId: id, deploymentId }, { transaction: t });
    }
    await audit({ actorId, action: 'lti.registration.update', entityType: 'lti_registration', entityId: id, before, after: data }, t);
  });
  forgetPlatformKeys(before.keySetUrl);
}

export async function deleteRegistration(id: number, actorId: number | null) {
  const row = await registrationOr404(id);
  await sequelize().transaction(async (t) => {
    await row.destroy({ transaction: t });
    await audit(
      { actorId, action: 'lti.registration.delete', entityType: 'lti_registration', entityId: id, before: row.toJSON(), after: null },
      t,
    );
  });
  forgetPlatformKeys(row.keySetUrl);
}

async function checkCohort(courseId: number, cohortId: number | null | undefined) {
  if (!cohortId) return;
  const cohort = await models().Cohort.findByPk(cohortId);
  if (!cohort || cohort.courseId !== courseId) throw new HttpError(400, 'The cohort must be one of this course’s.');
  if (cohort.archivedAt) throw new HttpError(400, 'The cohort is archived; choose an open one.');
}

export async function connectContext(data: z.output<typeof contextCreateSchema>, actorId: number | null) {
  const { LtiContext, Course } = models();
  await registrationOr404(data.registrationId);
  const course = await Course.findByPk(data.courseId);
  if (!course) throw new HttpError(404, 'No such course.');
  await checkCohort(course.id, data.defaultCohortId);
  return sequelize().transaction(async (t) => {
    if (await LtiContext.findOne({ where: { registrationId: data.registrationId, contextId: data.contextId }, transaction: t })) {
      throw new HttpError(409, 'This learning-platform course is already connected.');
    }
    const row = await LtiContext.create(
      {
        registrationId: data.registrationId,
        contextId: data.contextId,
        courseId: course.id,
        defaultCohortId: data.defaultCohortId ?? null,
        title: null,
        membershipsUrl: null,
        lineItemsUrl: null,
        agsScopes: null,
        rosterSyncedAt: null,
      },
      { transaction: t },
    );
    await audit(
      {
        actorId,
        action: 'lti.context.connect',
        entityType: 'course',
        entityId: course.id,
        before: null,
        after: { ltiContextId: row.id, ...data },
      },
      t,
    );
    return row;
  });
}

export async function contextOr404(id: number) {
  const row = await models().LtiContext.findByPk(id);
  if (!row) throw new HttpError(404, 'No such learning-platform course.');
  return row;
}

export async function setDefaultCohort(id: number, cohortId: number | null, actorId: number | null) {
  const ctx = await contextOr404(id);
  await checkCohort(ctx.courseId, cohortId);
  const before = { defaultCohortId: ctx.defaultCohortId };
  await sequelize().transaction(async (t) => {
    await models().LtiContext.update({ defaultCohortId: cohortId }, { where: { id }, transaction: t });
    await audit(
      { actorId, action: 'lti.context.cohort', entityType: 'course', entityId: ctx.courseId, before, after: { defaultCohortId: cohortId } },
      t,
    );
  });
}

export async function disconnectContext(id: number, actorId: number | null) {
  const ctx = await contextOr404(id);
  await sequelize().transaction(async (t) => {
    await ctx.destroy({ transaction: t });
    await audit(
      { actorId, action: 'lti.context.disconnect', entityType: 'course', entityId: ctx.courseId, before: ctx.toJSON(), after: null },
      t,
    );
  });
}
