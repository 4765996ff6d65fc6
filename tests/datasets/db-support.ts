// Set-up of the dataset tests that use the database: the portal's dataset routes and the public GET routes
// behind one in-process server, sessions and teams from the portal's test support.
import request from "supertest";
import * as list from "@/app/api/portal/datasets/route";
import * as one from "@/app/api/portal/datasets/[id]/route";
import * as versions from "@/app/api/portal/datasets/[id]/versions/route";
import * as raw from "@/app/api/portal/datasets/[id]/versions/[version]/raw/route";
import * as progress from "@/app/api/portal/datasets/uploads/[uploadId]/route";
import * as apiList from "@/app/api/v1/datasets/route";
import * as apiOne from "@/app/api/v1/datasets/[id]/route";
import { routeServer, type RouteModule } from "../support/route-server";

export const datasetServer = () =>
  routeServer({
    "/api/portal/datasets": list as RouteModule,
    "/api/portal/datasets/uploads/[uploadId]": progress as RouteModule,
    "/api/portal/datasets/[id]": one as RouteModule,
    "/api/portal/datasets/[id]/versions": versions as RouteModule,
    "/api/portal/datasets/[id]/versions/[version]/raw": raw as RouteModule,
    "/api/v1/datasets": apiList as RouteModule,
    "/api/v1/datasets/[id]": apiOne as RouteModule,
  });

/** POSTs a file body to an upload path with the form's fields in the query string. */
export function upload(server: ReturnType<typeof datasetServer>, cookie: string, body: string | Buffer, fields: Record<string, string>, path = "/api/portal/datasets") {
  const qs = new URLSearchParams(fields).toString();
  return request(server).post(`${path}?${qs}`).set("cookie", cookie).set("content-type", "text/csv").send(typeof body === "string" ? Buffer.from(body) : body);
}
