import { Router } from 'express';
import { z } from 'zod';
import { inviteRequestSchema, rolesRequestSchema, type InviteRequest, type RolesRequest } from '../../contracts/people';
import { allow, ANY_ROLE } from '../../lib/access';
import { validate, validated } from '../../lib/validate';
import type { PeopleService } from './service';

const idParams = z.object({ id: z.uuid({ error: 'A person id is a UUID.' }) });
type IdParams = z.infer<typeof idParams>;

/** The signed-in person, and people admin for workshop admins. */
export function peopleRouter(people: PeopleService): Router {
  const router = Router();
  router.get('/me', allow(...ANY_ROLE), (req, res) => {
    const { id, email, displayName, roles } = req.user!;
    res.json({ id, email, displayName, roles });
  });

  router.get('/', allow('workshop_admin'), async (_req, res) => {
    res.json(await people.list());
  });

  router.post('/', allow('workshop_admin'), validate({ body: inviteRequestSchema }), async (req, res) => {
    const person = await people.invite(req.user!, validated<InviteRequest>(res, 'body'));
    res.status(201).location(`/api/people/${person.id}`).json(person);
  });

  router.get('/:id', allow('workshop_admin'), validate({ params: idParams }), async (_req, res) => {
    res.json(await people.get(validated<IdParams>(res, 'params').id));
  });

  router.put('/:id/roles', allow('workshop_admin'), validate({ params: idParams, body: rolesRequestSchema }), async (req, res) => {
    const { id } = validated<IdParams>(res, 'params');
    res.json(await people.setRoles(req.user!, id, validated<RolesRequest>(res, 'body').roles));
  });

  router.post('/:id/invitation', allow('workshop_admin'), validate({ params: idParams }), async (req, res) => {
    res.status(201).json(await people.resendInvitation(req.user!, validated<IdParams>(res, 'params').id));
  });

  router.post('/:id/deactivate', allow('workshop_admin'), validate({ params: idParams }), async (req, res) => {
    res.json(await people.deactivate(req.user!, validated<IdParams>(res, 'params').id));
  });

  router.post('/:id/reactivate', allow('workshop_admin'), validate({ params: idParams }), async (req, res) => {
    res.json(await people.reactivate(req.user!, validated<IdParams>(res, 'params').id));
  });
  return router;
}
