import { Link, type LinkProps } from "react-router";

export const textLinkClasses = "font-bold text-indigo underline underline-offset-2 hover:decoration-2";

/** An in-app link in running text. */
export function TextLink({ className = "", ...rest }: LinkProps) {
  return <Link className={`${textLinkClasses} ${className}`.trim()} {...rest} />;
}
