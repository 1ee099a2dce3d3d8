import { calibrateThicknessConstant } from '../../../../lib/domain/film/dip-coat.ts';
import { calcRoute } from '../../../../lib/server/calc-route.ts';
import { CalibrationInputSchema } from '../../../../lib/shared/calc.ts';
import { operation } from '../../../../lib/server/api-operation.ts';
import { ThicknessCalibrationSchema } from '../../../../lib/shared/api/calc.ts';

export const contract = {
  POST: operation({
    summary: 'Calibrate the thickness constant from measured films',
    tag: 'calculators',
    action: 'calc.use',
    body: CalibrationInputSchema,
    responses: { 200: ThicknessCalibrationSchema },
  }),
};

/** Thickness constant C in h = C·(ηU)^k from measured films, by least squares (fixed k = 2/3 and free k). */
export const POST = calcRoute(contract.POST, (input) => calibrateThicknessConstant(input.points));
