import { blushRisk, dewPointC } from '../../../../lib/domain/room/dew-point.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { DewPointInputSchema } from '../../../../lib/shared/room.ts';

/** Dew point of the room air (Magnus, Alduchov & Eskridge 1996) and, with a surface temperature, the blush risk. */
export const POST = calcRoute(DewPointInputSchema, (input) => ({
  dewPointC: dewPointC(input.airC, input.rhPct),
  blush: input.surfaceC === undefined ? null : blushRisk(input.airC, input.rhPct, input.surfaceC, input.marginC),
}));
