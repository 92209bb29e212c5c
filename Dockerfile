# The image of the web and ingest services of docker-compose.yml.
FROM node:20-bookworm-slim
ENV NEXT_TELEMETRY_DISABLED=1 NODE_ENV=production
WORKDIR /srv/millrace
COPY package.json package-lock.json ./
RUN npm ci --include=dev
COPY . .
RUN npx next build
EXPOSE 3000
CMD ["npm", "run", "web"]
