/** @type {import('next').NextConfig} */
const nextConfig = {
  output: "standalone",
  serverExternalPackages: ["sequelize", "pg", "pg-hstore", "bcryptjs", "nodemailer", "smtp-server", "mailparser"],
  poweredByHeader: false,
};

export default nextConfig;
