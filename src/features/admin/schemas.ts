// The admin forms: the server's request schemas (src/shared/schemas/), with a select's string turned into a number.
import { numberInput } from "../../lib/forms.ts";
import { inviteBody } from "../../shared/schemas/users.ts";
import { areaBody, siteBody } from "../../shared/schemas/sites.ts";
import { gatewayBody } from "../../shared/schemas/gateways.ts";

export const inviteSchema = inviteBody;

export const siteSchema = siteBody;

export const areaSchema = areaBody;

export const gatewaySchema = gatewayBody.extend({ siteId: numberInput(gatewayBody.shape.siteId) });
