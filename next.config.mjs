/** @type {import('next').NextConfig} */
const nextConfig = {
  // A separate output folder lets the test run build beside a running `npm start`.
  distDir: process.env.NEXT_DIST_DIR || ".next",
  serverExternalPackages: ["pg", "pg-boss", "@node-rs/argon2", "nodemailer", "@aws-sdk/client-s3"],
  poweredByHeader: false,
  typedRoutes: false,
};
export default nextConfig;
