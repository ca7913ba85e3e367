import { data } from "react-router";

/**
 * The request's form body, or a 400 in words: a body that is not a form (JSON sent to a
 * form action, a broken multipart stream) is the sender's mistake, never a server error.
 */
export async function readFormData(request: Request): Promise<FormData> {
  try {
    return await request.formData();
  } catch {
    throw data("The request body is not a form: send it as application/x-www-form-urlencoded or multipart/form-data.", { status: 400 });
  }
}
