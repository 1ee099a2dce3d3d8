import { blushRisk, dewPointC } from '../../../../lib/domain/room/dew-point.ts';
import { z } from 'zod';
import { operation } from '../../../../lib/server/api-operation.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { DewPointInputSchema } from '../../../../lib/shared/room.ts';

/** Dew point of the room air (Magnus, Alduchov & Eskridge 1996) and, with a surface temperature, the blush risk. */
export const contract = {
  POST: operation({
    summary: 'Dew point (Magnus) and blush risk of a surface',
    tag: 'calculators',
    action: 'calc.use',
    body: DewPointInputSchema,
    responses: { 200: z.looseObject({}) },
  }),
};

export const POST = calcRoute(contract.POST, (input) => ({
  dewPointC: dewPointC(input.airC, input.rhPct),
  blush: input.surfaceC === undefined ? null : blushRisk(input.airC, input.rhPct, input.surfaceC, input.marginC),
}));
