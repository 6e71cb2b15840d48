// Site gateways (admin): the request body of POST /api/gateways.
import { z } from "zod";

export const gatewayBody = z.object({
  name: z.string({ message: "Give the gateway a name, e.g. where it is mounted." }).trim().min(1, "Give the gateway a name, e.g. where it is mounted.").max(200, "Keep the name under 200 characters."),
  siteId: z.number({ message: "Pick a site." }).int("Pick a site.").positive("Pick a site."),
});
export type GatewayBody = z.output<typeof gatewayBody>;
